import { useState, type FormEvent } from "react";
import { IMPORT_MAX_BYTES, IMPORT_MAX_LABEL, type ImportSummary } from "@shared/schemas/imports";
import {
  occurrenceMappingSchema,
  type OccurrenceMapping,
  type OccurrenceMappingDraft,
  type OccurrencePreview,
  type OccurrenceUpload,
} from "@shared/schemas/occurrences";
import { Button } from "../../../components/Button";
import { Card } from "../../../components/Card";
import { CsvUploadForm } from "../../../components/CsvUploadForm";
import { FormError, Notice } from "../../../components/Notice";
import { ProblemTable } from "../../../components/ProblemTable";
import { ProgressBar } from "../../../components/ProgressBar";
import { SampleRowsTable } from "../../../components/SampleRowsTable";
import { Select } from "../../../components/Select";
import { WizardSteps } from "../../../components/WizardSteps";
import { ApiError, errorMessage } from "../../../lib/api";
import { formatCount, pluralize } from "../../../lib/format";
import { useCommitOccurrences, useDiscardOccurrences, useOccurrenceUploadProgress, usePreviewOccurrences, useUploadOccurrences } from "./api";
import { ImportChecksPanel, NO_SPELLINGS_CHOSEN, type ChosenSpellings } from "../ImportChecksPanel";
import { MappingStepActions } from "../../../components/MappingStepActions";

type Stage =
  | { step: "upload" }
  | { step: "map"; upload: OccurrenceUpload; mapping?: OccurrenceMappingDraft }
  | { step: "preview"; upload: OccurrenceUpload; mapping: OccurrenceMapping; duplicates: "keep" | "drop"; preview: OccurrencePreview }
  | { step: "done"; summary: ImportSummary };

const STEPS = [
  { key: "map", label: "Map the columns" },
  { key: "preview", label: "Check every row" },
  { key: "done", label: "Commit" },
] as const;

const FIELDS: Array<{ key: keyof OccurrenceMappingDraft; label: string; hint: string }> = [
  { key: "taxon", label: "Taxon name", hint: "Required. Names are matched exactly after trimming." },
  { key: "higherTaxon", label: "Higher taxon", hint: "Optional: clade, family, order…" },
  { key: "maxMa", label: "Maximum age (Ma)", hint: "The oldest the find can be. A cell may also hold an interval name (its base is read)." },
  { key: "minMa", label: "Minimum age (Ma)", hint: "The youngest the find can be. Without it each find is dated to the maximum age alone." },
  { key: "earlyInterval", label: "Early interval", hint: "Interval name of the oldest possible age (its base), used where the Ma cells are empty." },
  { key: "lateInterval", label: "Late interval", hint: "Interval name of the youngest possible age (its top); empty means the early interval." },
  { key: "collection", label: "Collection or locality", hint: "Optional: counts distinct collections per taxon." },
  { key: "count", label: "Count", hint: "Optional: specimens or records the row stands for (a whole number)." },
];

/** Upload, map, preview and commit an occurrence table: one row per dated find. */
export function OccurrenceWizard({ studyId }: { studyId: string }) {
  const [stage, setStage] = useState<Stage>({ step: "upload" });
  const discard = useDiscardOccurrences(studyId);

  function startOver(uploadId?: string) {
    if (uploadId) discard.mutate(uploadId);
    setStage({ step: "upload" });
  }

  return (
    <Card
      title="Upload occurrences"
      description="One row per dated find: taxon, ages in Ma or interval names, optionally higher taxon, collection and count. Ranges can then be derived from the finds."
    >
      <WizardSteps label="Steps of the occurrence upload" steps={STEPS} current={stage.step === "upload" ? -1 : STEPS.findIndex((s) => s.key === stage.step)} />
      {stage.step === "upload" && <OccurrenceUploadStep studyId={studyId} onUploaded={(upload) => setStage({ step: "map", upload })} />}
      {stage.step === "map" && (
        <OccurrenceMappingStep
          studyId={studyId}
          upload={stage.upload}
          initial={stage.mapping ?? stage.upload.suggestedMapping}
          onPreviewed={(mapping, duplicates, preview) => setStage({ step: "preview", upload: stage.upload, mapping, duplicates, preview })}
          onStartOver={() => startOver(stage.upload.upload.id)}
        />
      )}
      {stage.step === "preview" && (
        <OccurrencePreviewStep
          studyId={studyId}
          stage={stage}
          onBack={() => setStage({ step: "map", upload: stage.upload, mapping: stage.mapping })}
          onCommitted={(summary) => setStage({ step: "done", summary })}
        />
      )}
      {stage.step === "done" && (
        <div className="space-y-4">
          <Notice tone="success" title={`Uploaded ${stage.summary.fileName}`}>
            {pluralize(stage.summary.createdCount, "occurrence")} written
            {stage.summary.skippedInvalid > 0 && `, ${pluralize(stage.summary.skippedInvalid, "invalid row")} left out`}. Derive ranges from them below; the
            upload is listed there and can be reverted.
          </Notice>
          <Button variant="secondary" onClick={() => setStage({ step: "upload" })}>
            Upload another file
          </Button>
        </div>
      )}
    </Card>
  );
}

function OccurrenceUploadStep({ studyId, onUploaded }: { studyId: string; onUploaded: (upload: OccurrenceUpload) => void }) {
  return (
    <CsvUploadForm
      upload={useUploadOccurrences(studyId)}
      onUploaded={onUploaded}
      formLabel="Upload an occurrence file"
      fieldLabel="Occurrence file (CSV)"
      hint={`Comma, semicolon or tab separated, with a header row; at most ${IMPORT_MAX_LABEL} (about a million finds).`}
      missingFile="Choose a CSV file of occurrences"
      maxBytes={IMPORT_MAX_BYTES}
      maxLabel={IMPORT_MAX_LABEL}
      tooLargeAdvice="Split it into smaller files."
      submitLabel="Upload and read the occurrences"
    />
  );
}

function OccurrenceMappingStep({
  studyId,
  upload,
  initial,
  onPreviewed,
  onStartOver,
}: {
  studyId: string;
  upload: OccurrenceUpload;
  initial: OccurrenceMappingDraft;
  onPreviewed: (mapping: OccurrenceMapping, duplicates: "keep" | "drop", preview: OccurrencePreview) => void;
  onStartOver: () => void;
}) {
  const [draft, setDraft] = useState<OccurrenceMappingDraft>(initial);
  const [duplicates, setDuplicates] = useState<"keep" | "drop">("keep");
  const [errors, setErrors] = useState<Record<string, string>>({});
  const preview = usePreviewOccurrences(studyId);
  const options = [{ value: "", label: "— not in this file —" }, ...upload.columns.map((c) => ({ value: c, label: c }))];

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    // The same schema the server checks with: a file without age columns is refused here, before any request.
    const parsed = occurrenceMappingSchema.safeParse(Object.fromEntries(Object.entries(draft).filter(([, v]) => v !== null && v !== "")));
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0] ?? "taxon"), i.message])));
      return;
    }
    setErrors({});
    preview.mutate(
      { uploadId: upload.upload.id, mapping: parsed.data, duplicates },
      {
        onSuccess: (result) => onPreviewed(parsed.data, duplicates, result),
        onError: (error) => {
          if (error instanceof ApiError) setErrors(Object.fromEntries(Object.entries(error.fields).map(([k, v]) => [k.replace(/^mapping\./, ""), v])));
        },
      },
    );
  }

  return (
    <form noValidate onSubmit={submit} className="space-y-5" aria-label="Map the occurrence columns">
      <p className="text-sm text-stone-700">
        {upload.upload.fileName}: {pluralize(upload.rowCount, "data row")}, {pluralize(upload.columns.length, "column")}.
      </p>
      {!upload.ageColumnsFound && (
        <Notice tone="error" title="No age columns recognised">
          No column is named like an age or an interval. An occurrence table needs the age of each find (maximum and minimum in Ma, or early and late interval names):
          map them below, or upload a different file.
        </Notice>
      )}
      <div className="overflow-x-auto rounded-lg border border-stone-200">
        <SampleRowsTable columns={upload.columns} rows={upload.sampleRows} caption="The first rows of the file" />
      </div>
      <FormError message={preview.error && !(preview.error instanceof ApiError && Object.keys(preview.error.fields).length) ? errorMessage(preview.error) : null} />
      <div className="grid gap-4 sm:grid-cols-2">
        {FIELDS.map((f) => (
          <Select
            key={f.key}
            label={f.label}
            hint={f.hint}
            optional={f.key !== "taxon"}
            error={errors[f.key]}
            value={draft[f.key] ?? ""}
            options={options}
            onChange={(e) => setDraft({ ...draft, [f.key]: e.target.value || null })}
          />
        ))}
        <Select
          label="Duplicate rows"
          hint="Rows identical to an earlier row in every mapped column are always reported."
          value={duplicates}
          options={[
            { value: "keep", label: "Keep them (each counts as a find)" },
            { value: "drop", label: "Drop them" },
          ]}
          onChange={(e) => setDuplicates(e.target.value === "drop" ? "drop" : "keep")}
        />
      </div>
      <MappingStepActions onStartOver={onStartOver} checking={preview.isPending} />
    </form>
  );
}

function OccurrencePreviewStep({
  studyId,
  stage,
  onBack,
  onCommitted,
}: {
  studyId: string;
  stage: Extract<Stage, { step: "preview" }>;
  onBack: () => void;
  onCommitted: (summary: ImportSummary) => void;
}) {
  const { mapping, duplicates, upload } = stage;
  // A choice about similar names makes the preview again; the commit uses the same choice.
  const [preview, setPreview] = useState(stage.preview);
  const [spellings, setSpellings] = useState<ChosenSpellings>(NO_SPELLINGS_CHOSEN);
  const again = usePreviewOccurrences(studyId);
  const [skipInvalid, setSkipInvalid] = useState(false);
  const commit = useCommitOccurrences(studyId);
  const progress = useOccurrenceUploadProgress(studyId, upload.upload.id, commit.isPending);
  const { counts } = preview;

  return (
    <div className="space-y-5">
      <dl className="grid grid-cols-2 gap-3 text-sm sm:grid-cols-5">
        {[
          ["Rows", counts.rows],
          ["Valid", counts.valid],
          ["With problems", counts.invalid],
          ["Duplicates", counts.duplicates],
          ["Taxa", counts.taxa],
        ].map(([label, value]) => (
          <div key={label} className="rounded-lg bg-stone-50 px-3 py-2">
            <dt className="text-stone-600">{label}</dt>
            <dd className="text-lg font-semibold tabular-nums">{formatCount(value as number)}</dd>
          </div>
        ))}
      </dl>
      <p className="text-sm text-stone-600">Rows are numbered as a spreadsheet shows them: the header is row 1, so the first data row is row 2.</p>
      {preview.problemCount > 0 && (
        <ProblemTable
          problems={preview.problems.map((p) => ({ row: p.row, column: p.column, message: `${p.taxon ? `${p.taxon}: ` : "(no taxon): "}${p.message}` }))}
          problemCount={preview.problemCount}
          invalidRows={counts.invalid}
        />
      )}
      <ImportChecksPanel
        checks={preview.checks}
        merges={spellings}
        busy={again.isPending || commit.isPending}
        onMergesChange={(next) =>
          again.mutate(
            { uploadId: upload.upload.id, mapping, duplicates, nameMerges: next.names, higherTaxonMerges: next.higherTaxa },
            {
              onSuccess: (result) => {
                setSpellings(next);
                setPreview(result);
              },
            },
          )
        }
      />
      {again.error && <FormError message={`The preview could not be made again: ${errorMessage(again.error)}`} />}
      {counts.duplicates > 0 && (
        <Notice tone="info" title={`${pluralize(counts.duplicates, "duplicate row")} (${duplicates === "drop" ? "dropped" : "kept"})`}>
          {preview.duplicates
            .slice(0, 8)
            .map((d) => `row ${d.row} repeats row ${d.firstRow} (${d.taxon})`)
            .join("; ")}
          {counts.duplicates > 8 ? "; …" : ""}. Go back to change whether they are kept.
        </Notice>
      )}
      <ul className="list-disc space-y-1 pl-5 text-sm text-stone-600">
        {preview.notes.map((n) => (
          <li key={n}>{n}</li>
        ))}
      </ul>
      {counts.invalid > 0 && (
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" checked={skipInvalid} onChange={(e) => setSkipInvalid(e.target.checked)} />
          Leave the {pluralize(counts.invalid, "row")} with problems out and write the {formatCount(counts.valid)} valid ones
        </label>
      )}
      {commit.isPending && <ProgressBar label="Writing the occurrences" value={progress.data?.progress ?? 0} />}
      <FormError message={commit.error ? errorMessage(commit.error) : null} />
      <div className="flex flex-wrap justify-between gap-3">
        <Button variant="secondary" onClick={onBack} disabled={commit.isPending}>
          Back to the mapping
        </Button>
        <Button
          busy={commit.isPending}
          disabled={counts.valid === 0 || (counts.invalid > 0 && !skipInvalid)}
          onClick={() => commit.mutate({ uploadId: upload.upload.id, input: { mapping, duplicates, nameMerges: spellings.names, higherTaxonMerges: spellings.higherTaxa, skipInvalid } }, { onSuccess: onCommitted })}
        >
          Write {pluralize(counts.valid, "occurrence")}
        </Button>
      </div>
    </div>
  );
}
