import { useState, type FormEvent } from "react";
import { IMPORT_MAX_BYTES, IMPORT_MAX_LABEL, type ImportUpload } from "@shared/schemas/imports";
import { Button } from "../../components/Button";
import { CsvFileField } from "../../components/CsvFileField";
import { FormError } from "../../components/Notice";
import { textLinkClasses } from "../../components/TextLink";
import { ApiError, errorMessage } from "../../lib/api";
import { templateCsvUrl } from "../../lib/queries/paths";
import { useUploadImport } from "./api";
import { ProgressBar } from "../../components/ProgressBar";
import type { UploadProgress } from "../../lib/uploadWithProgress";

const megabytes = (bytes: number) => `${(bytes / (1024 * 1024)).toFixed(bytes < 10 * 1024 * 1024 ? 1 : 0)} MB`;

/** Step 0: choose a CSV file and send it, with the upload's progress shown. */
export function UploadStep({ studyId, onUploaded }: { studyId: string; onUploaded: (upload: ImportUpload) => void }) {
  const upload = useUploadImport(studyId);
  const [file, setFile] = useState<File | null>(null);
  const [fileError, setFileError] = useState<string | undefined>();
  const [progress, setProgress] = useState<UploadProgress | null>(null);

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    if (!file) {
      setFileError("Choose a CSV file to import");
      return;
    }
    if (file.size > IMPORT_MAX_BYTES) {
      setFileError(`This file is ${megabytes(file.size)}; the limit is ${IMPORT_MAX_LABEL}. Split it into smaller files.`);
      return;
    }
    if (file.size === 0) {
      setFileError("This file is empty");
      return;
    }
    setProgress({ loaded: 0, total: file.size });
    upload.mutate({ file, onProgress: setProgress }, { onSuccess: onUploaded, onSettled: () => setProgress(null) });
  }

  const sent = progress && progress.total > 0 ? progress.loaded / progress.total : 0;

  return (
    <form noValidate onSubmit={submit} className="space-y-5" aria-label="Upload a CSV file">
      <FormError message={upload.error ? errorMessage(upload.error) : null} />
      <CsvFileField
        label="CSV file"
        hint={`Comma, semicolon or tab separated, with a header row; UTF-8 (with or without BOM), UTF-16 or Windows-1252. Up to ${IMPORT_MAX_LABEL}.`}
        error={fileError ?? (upload.error instanceof ApiError ? upload.error.fields.file : undefined)}
        disabled={upload.isPending}
        onFile={(chosen) => {
          setFile(chosen);
          setFileError(undefined);
          upload.reset();
        }}
      />
      {upload.isPending && (
        <ProgressBar
          label={`Uploading ${file?.name ?? "the file"}`}
          value={sent < 1 ? sent : null}
          detail={sent < 1 ? `${megabytes(progress?.loaded ?? 0)} of ${megabytes(progress?.total ?? 0)}` : "Reading the file…"}
        />
      )}
      <div className="flex flex-col gap-3 sm:flex-row sm:items-center sm:justify-between">
        <p className="text-sm text-stone-600">
          Starting from scratch?{" "}
          <a className={textLinkClasses} href={templateCsvUrl(studyId)} download>
            Download a CSV template
          </a>{" "}
          with a column for every trait of the codebook.
        </p>
        <Button type="submit" busy={upload.isPending}>
          Upload and read the file
        </Button>
      </div>
    </form>
  );
}
