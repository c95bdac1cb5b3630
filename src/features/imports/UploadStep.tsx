import { IMPORT_MAX_BYTES, IMPORT_MAX_LABEL, type ImportUpload } from "@shared/schemas/imports";
import { CsvUploadForm } from "../../components/CsvUploadForm";
import { textLinkClasses } from "../../components/TextLink";
import { templateCsvUrl } from "../../lib/queries/paths";
import { useUploadImport } from "./api";

/** Step 0: choose a CSV file and send it, with the upload's progress shown. */
export function UploadStep({ studyId, onUploaded }: { studyId: string; onUploaded: (upload: ImportUpload) => void }) {
  return (
    <CsvUploadForm
      upload={useUploadImport(studyId)}
      onUploaded={onUploaded}
      formLabel="Upload a CSV file"
      fieldLabel="CSV file"
      hint={`Comma, semicolon or tab separated, with a header row; UTF-8 (with or without BOM), UTF-16 or Windows-1252. Up to ${IMPORT_MAX_LABEL}.`}
      missingFile="Choose a CSV file to import"
      maxBytes={IMPORT_MAX_BYTES}
      maxLabel={IMPORT_MAX_LABEL}
      tooLargeAdvice="Split it into smaller files."
      submitLabel="Upload and read the file"
      aside={
        <p className="text-sm text-stone-600">
          Starting from scratch?{" "}
          <a className={textLinkClasses} href={templateCsvUrl(studyId)} download>
            Download a CSV template
          </a>{" "}
          with a column for every trait of the codebook.
        </p>
      }
    />
  );
}
