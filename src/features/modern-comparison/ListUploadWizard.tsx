import { useState, type FormEvent } from "react";
import { IUCN_CATEGORIES, IUCN_SOURCE } from "@shared/iucn";
import {
  listNameSchema,
  MODERN_LIST_MAX_BYTES,
  MODERN_LIST_MAX_LABEL,
  modernListMappingSchema,
  type ModernList,
  type ModernListMapping,
  type ModernListPreview,
  type ModernListUpload,
} from "@shared/schemas/modernLists";
import { Button } from "../../components/Button";
import { CsvUploadForm } from "../../components/CsvUploadForm";
import { cx } from "../../lib/cx";
import { ProblemTable } from "../../components/ProblemTable";
import { WizardSteps } from "../../components/WizardSteps";
import { FormError, Notice } from "../../components/Notice";
import { Select } from "../../components/Select";
import { TextField } from "../../components/TextField";
import { ApiError, errorMessage } from "../../lib/api";
import { issuesToFieldErrors, type FieldErrors } from "../../lib/forms";
import { formatCount, pluralize } from "../../lib/format";
import { useCommitModernList, useDiscardModernUpload, usePreviewModernList, useUploadModernList } from "./api";
import { CategoryBadge } from "./CategoryBadge";
import { SampleRowsTable } from "../../components/SampleRowsTable";
import { MappingStepActions } from "../../components/MappingStepActions";

type Stage =
  | { step: "upload" }
  | { step: "map"; upload: ModernListUpload; mapping?: ModernListMapping; name?: string }
  | { step: "preview"; upload: ModernListUpload; mapping: ModernListMapping; name: string; preview: ModernListPreview };

const STEPS = [
  { key: "map", label: "Say which column is which" },
  { key: "preview", label: "Check every row" },
  { key: "save", label: "Save the list" },
] as const;

/** Upload a modern species list, map its columns, check every row, and save it all or not at all. */
export function ListUploadWizard({ studyId, onSaved, onCancel }: { studyId: string; onSaved: (list: ModernList) => void; onCancel: () => void }) {
  const [stage, setStage] = useState<Stage>({ step: "upload" });
  const discard = useDiscardModernUpload(studyId);

  function startOver(uploadId?: string) {
    if (uploadId) discard.mutate(uploadId);
    setStage({ step: "upload" });
  }

  const current = stage.step === "upload" ? -1 : stage.step === "map" ? 0 : 1;
  return (
    <div>
      <WizardSteps label="Steps of the upload" steps={STEPS} current={current} />
      {stage.step === "upload" && <UploadStep studyId={studyId} onUploaded={(upload) => setStage({ step: "map", upload })} onCancel={onCancel} />}
      {stage.step === "map" && (
        <MapStep
          studyId={studyId}
          upload={stage.upload}
          initialMapping={stage.mapping}
          initialName={stage.name}
          onPreviewed={(mapping, name, preview) => setStage({ step: "preview", upload: stage.upload, mapping, name, preview })}
          onStartOver={() => startOver(stage.upload.upload.id)}
        />
      )}
      {stage.step === "preview" && (
        <PreviewStep
          studyId={studyId}
          mapping={stage.mapping}
          name={stage.name}
          preview={stage.preview}
          onBack={() => setStage({ step: "map", upload: stage.upload, mapping: stage.mapping, name: stage.name })}
          onSaved={onSaved}
        />
      )}
    </div>
  );
}

function UploadStep({ studyId, onUploaded, onCancel }: { studyId: string; onUploaded: (upload: ModernListUpload) => void; onCancel: () => void }) {
  return (
    <CsvUploadForm
      upload={useUploadModernList(studyId)}
      onUploaded={onUploaded}
      formLabel="Upload a modern species list"
      fieldLabel="Species list (CSV)"
      hint={`One row per species: its name, optionally a higher taxon, its threat category (an IUCN 3.1 code or name: ${IUCN_CATEGORIES.join(", ")}) and any trait columns. Comma, semicolon or tab separated; up to ${MODERN_LIST_MAX_LABEL}.`}
      missingFile="Choose a CSV file of species"
      maxBytes={MODERN_LIST_MAX_BYTES}
      maxLabel={MODERN_LIST_MAX_LABEL}
      submitLabel="Upload and read the list"
      onCancel={onCancel}
    />
  );
}

interface MapStepProps {
  studyId: string;
  upload: ModernListUpload;
  initialMapping?: ModernListMapping;
  initialName?: string;
  onPreviewed: (mapping: ModernListMapping, name: string, preview: ModernListPreview) => void;
  onStartOver: () => void;
}

const DELIMITER_NAMES: Record<string, string> = { ",": "comma", ";": "semicolon", "\t": "tab" };

function MapStep({ studyId, upload, initialMapping, initialName, onPreviewed, onStartOver }: MapStepProps) {
  const start = initialMapping ?? upload.suggestedMapping;
  const [name, setName] = useState(initialName ?? upload.suggestedName);
  const [nameColumn, setNameColumn] = useState(start.name ?? "");
  const [higherColumn, setHigherColumn] = useState(start.higherTaxon ?? "");
  const [categoryColumn, setCategoryColumn] = useState(start.category ?? "");
  const [traitColumns, setTraitColumns] = useState<string[]>(start.traitColumns);
  const [errors, setErrors] = useState<FieldErrors>({});
  const preview = usePreviewModernList(studyId);
  const taken = new Set([nameColumn, higherColumn, categoryColumn].filter(Boolean));
  const options = (optional: boolean) => [{ value: "", label: optional ? "— None —" : "— Choose a column —" }, ...upload.columns.map((c) => ({ value: c, label: c }))];

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const kept = traitColumns.filter((c) => !taken.has(c));
    const mapping = modernListMappingSchema.safeParse({ name: nameColumn, higherTaxon: higherColumn || null, category: categoryColumn, traitColumns: kept });
    const listName = listNameSchema.safeParse(name);
    const found: FieldErrors = {
      ...(mapping.success ? {} : issuesToFieldErrors(mapping.error)),
      ...(listName.success ? {} : { listName: listName.error.issues[0].message }),
    };
    if (!mapping.success || !listName.success) return setErrors(found);
    setErrors({});
    preview.mutate(
      { uploadId: upload.upload.id, mapping: mapping.data },
      {
        onSuccess: (result) => onPreviewed(mapping.data, listName.data, result),
        onError: (error) => {
          if (error instanceof ApiError) setErrors(Object.fromEntries(Object.entries(error.fields).map(([k, v]) => [k.replace(/^mapping\./, ""), v])));
        },
      },
    );
  }

  return (
    <form noValidate onSubmit={submit} className="space-y-6" aria-label="Which column is which">
      <p className="text-sm text-stone-600">
        {upload.upload.fileName}: {pluralize(upload.rowCount, "row")}, {upload.columns.length} columns, {DELIMITER_NAMES[upload.delimiter]} separated, {upload.encoding.toUpperCase()}
        {upload.hadBom ? " with a byte-order mark" : ""}.
      </p>
      <FormError message={preview.error && !(preview.error instanceof ApiError && Object.keys(preview.error.fields).length) ? errorMessage(preview.error) : null} />
      <TextField label="Name of the list" value={name} onChange={(e) => setName(e.target.value)} error={errors.listName} maxLength={120} />
      <div className="grid gap-4 sm:grid-cols-3">
        <Select label="Species name" options={options(false)} value={nameColumn} onChange={(e) => setNameColumn(e.target.value)} error={errors.name} hint="Each name once in the file." />
        <Select label="Higher taxon" optional options={options(true)} value={higherColumn} onChange={(e) => setHigherColumn(e.target.value)} error={errors.higherTaxon} />
        <Select
          label="Threat category"
          options={options(false)}
          value={categoryColumn}
          onChange={(e) => setCategoryColumn(e.target.value)}
          error={errors.category}
          hint="IUCN 3.1 codes or names, e.g. VU or Vulnerable."
        />
      </div>
      <fieldset>
        <legend className="text-sm font-medium text-stone-800">Trait columns to keep</legend>
        <p className="mt-1 text-sm text-stone-500">Kept as written. The crosswalk, the next screen after saving, says which trait and state each value means.</p>
        <div className="mt-3 flex flex-wrap gap-2">
          {upload.columns
            .filter((c) => !taken.has(c))
            .map((c) => (
              <label key={c} className="inline-flex cursor-pointer items-center gap-2 rounded-lg border border-stone-300 bg-white px-3 py-1.5 text-sm has-[:checked]:border-accent-500 has-[:checked]:bg-accent-50">
                <input
                  type="checkbox"
                  className="size-4 accent-accent-700"
                  checked={traitColumns.includes(c)}
                  onChange={(e) => setTraitColumns((cols) => (e.target.checked ? [...cols, c] : cols.filter((x) => x !== c)))}
                />
                {c}
              </label>
            ))}
        </div>
        {errors.traitColumns && <p className="mt-2 text-sm font-medium text-red-700">{errors.traitColumns}</p>}
      </fieldset>
      {upload.sampleRows.length > 0 && (
        <div className="overflow-x-auto rounded-lg border border-stone-200">
          <SampleRowsTable columns={upload.columns} rows={upload.sampleRows} caption="The first rows of the file" />
        </div>
      )}
      <MappingStepActions onStartOver={onStartOver} checking={preview.isPending} />
    </form>
  );
}

interface PreviewStepProps {
  studyId: string;
  mapping: ModernListMapping;
  name: string;
  preview: ModernListPreview;
  onBack: () => void;
  onSaved: (list: ModernList) => void;
}

function PreviewStep({ studyId, mapping, name, preview, onBack, onSaved }: PreviewStepProps) {
  const { counts } = preview;
  const [skipInvalid, setSkipInvalid] = useState(false);
  const [choiceError, setChoiceError] = useState<string | null>(null);
  const commit = useCommitModernList(studyId);
  const refused = commit.error instanceof ApiError && commit.error.code === "list_has_problems" ? ((commit.error.body as { problems?: ModernListPreview["problems"] })?.problems ?? null) : null;
  const problems = refused ?? preview.problems;

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    if (counts.valid === 0) return setChoiceError("No row of this file can be saved. Correct the problems above and upload the file again.");
    if (counts.invalid > 0 && !skipInvalid) return setChoiceError(`Tick the box to leave out the ${pluralize(counts.invalid, "invalid row")}, or correct the file and upload it again.`);
    setChoiceError(null);
    commit.mutate({ uploadId: preview.upload.id, input: { mapping, name, skipInvalid: counts.invalid > 0 && skipInvalid } }, { onSuccess: onSaved });
  }

  return (
    <form noValidate onSubmit={submit} className="space-y-6" aria-label="Check every row">
      <dl className="grid grid-cols-3 gap-3 text-center">
        {[
          ["Rows", counts.rows],
          ["Valid", counts.valid],
          ["With problems", counts.invalid],
        ].map(([label, n]) => (
          <div key={label} className={cx("rounded-lg border px-3 py-2", label === "With problems" && Number(n) > 0 ? "border-red-200 bg-red-50" : "border-stone-200 bg-stone-50")}>
            <dt className="text-xs font-medium text-stone-500 uppercase">{label}</dt>
            <dd className="text-xl font-semibold tabular-nums text-stone-900">{formatCount(Number(n))}</dd>
          </div>
        ))}
      </dl>
      <div>
        <h3 className="text-sm font-medium text-stone-800">Valid rows per threat category</h3>
        <ul className="mt-2 flex flex-wrap gap-3 text-sm" aria-label="Valid rows per threat category">
          {IUCN_CATEGORIES.map((c) => (
            <li key={c} className="inline-flex items-center gap-1.5">
              <CategoryBadge category={c} /> <span className="tabular-nums">{formatCount(preview.categories[c])}</span>
            </li>
          ))}
        </ul>
        <p className="mt-1 text-xs text-stone-500">Categories as defined in {IUCN_SOURCE}.</p>
      </div>
      {problems.length > 0 && <ProblemTable problems={problems} problemCount={preview.problemCount} invalidRows={counts.invalid} />}
      {preview.sample.length > 0 && (
        <details className="rounded-lg border border-stone-200 px-4 py-2 text-sm">
          <summary className="cursor-pointer font-medium text-stone-800">The first {Math.min(preview.sample.length, 50)} species as they will be saved</summary>
          <ul className="mt-2 divide-y divide-stone-100">
            {preview.sample.map((s) => (
              <li key={s.row} className="flex flex-wrap items-center gap-2 py-1.5">
                <CategoryBadge category={s.category} />
                <span className="font-medium italic">{s.name}</span>
                {s.higherTaxon && <span className="text-stone-500">{s.higherTaxon}</span>}
                <span className="text-stone-500">{Object.entries(s.traits).map(([k, v]) => `${k}: ${v || "—"}`).join(" · ")}</span>
              </li>
            ))}
          </ul>
        </details>
      )}
      <Notice>{preview.notes.join(" ")}</Notice>
      {counts.invalid > 0 && (
        <label className="flex items-start gap-3 rounded-lg border border-stone-300 bg-white px-4 py-3 text-[15px]">
          <input type="checkbox" className="mt-1 size-4 accent-accent-700" checked={skipInvalid} onChange={(e) => (setSkipInvalid(e.target.checked), setChoiceError(null))} />
          <span>
            Leave out the {pluralize(counts.invalid, "invalid row")} and save the {pluralize(counts.valid, "valid species", "valid species")}.
            <span className="block text-sm text-stone-500">Otherwise nothing is saved until the file is corrected.</span>
          </span>
        </label>
      )}
      <FormError message={choiceError ?? (commit.error ? errorMessage(commit.error) : null)} />
      <div className="flex flex-wrap justify-between gap-3">
        <Button variant="ghost" onClick={onBack} disabled={commit.isPending}>
          Back to the columns
        </Button>
        <Button type="submit" busy={commit.isPending}>
          Save the list of {pluralize(counts.valid, "species", "species")}
        </Button>
      </div>
    </form>
  );
}
