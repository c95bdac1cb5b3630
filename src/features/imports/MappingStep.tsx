import { useState, type FormEvent } from "react";
import { importMappingSchema, type ImportMapping, type ImportUpload } from "@shared/schemas/imports";
import type { Trait } from "@shared/schemas/traits";
import { FormError } from "../../components/Notice";
import { Select } from "../../components/Select";
import { ApiError, errorMessage } from "../../lib/api";
import { issuesToFieldErrors, type FieldErrors } from "../../lib/forms";
import { formatCount } from "../../lib/format";
import { usePreviewImport } from "./api";
import type { ImportPreview } from "@shared/schemas/imports";
import { SampleRowsTable } from "../../components/SampleRowsTable";
import { MappingStepActions } from "../../components/MappingStepActions";

type TaxonTarget = "name" | "higherTaxon" | "firstAppearance" | "lastAppearance" | "notes";

const TAXON_TARGETS: Array<{ key: TaxonTarget; label: string; hint?: string }> = [
  { key: "name", label: "Name", hint: "Required. Rows are matched to taxa of the same name." },
  { key: "higherTaxon", label: "Higher taxon" },
  { key: "firstAppearance", label: "First appearance", hint: "Ages in Ma or interval names (read as the interval's base)." },
  { key: "lastAppearance", label: "Last appearance", hint: "Ages in Ma or interval names (read as the interval's top)." },
  { key: "notes", label: "Notes" },
];

const DELIMITER_NAMES: Record<string, string> = { ",": "comma", ";": "semicolon", "\t": "tab" };

/** The targets' chosen columns, keyed "name" … or "trait:<id>"; "" leaves a target out. */
type Choices = Record<string, string>;

function choicesFrom(upload: ImportUpload, traits: Trait[]): Choices {
  const s = upload.suggestedMapping;
  const choices: Choices = {
    name: s.name ?? "",
    higherTaxon: s.higherTaxon ?? "",
    firstAppearance: s.firstAppearance ?? "",
    lastAppearance: s.lastAppearance ?? "",
    notes: s.notes ?? "",
  };
  for (const t of traits) choices[`trait:${t.id}`] = s.traits[t.id] ?? "";
  return choices;
}

function mappingFrom(choices: Choices) {
  const traits: Record<string, string> = {};
  for (const [key, header] of Object.entries(choices)) if (key.startsWith("trait:") && header) traits[key.slice(6)] = header;
  return {
    name: choices.name,
    higherTaxon: choices.higherTaxon || null,
    firstAppearance: choices.firstAppearance || null,
    lastAppearance: choices.lastAppearance || null,
    notes: choices.notes || null,
    traits,
  };
}

/** Field paths of the schema ("traits.<id>") to the keys of the choices ("trait:<id>"). */
function errorsByChoice(errors: FieldErrors): FieldErrors {
  const out: FieldErrors = {};
  for (const [path, message] of Object.entries(errors)) {
    const key = path.replace(/^mapping\./, "").replace(/^traits\./, "trait:");
    out[key] = message;
  }
  return out;
}

interface MappingStepProps {
  studyId: string;
  upload: ImportUpload;
  traits: Trait[];
  initialMapping?: ImportMapping;
  onPreviewed: (mapping: ImportMapping, preview: ImportPreview) => void;
  onStartOver: () => void;
}

/** Step 1: which column of the file fills which part of a taxon; the server's suggestion comes first. */
export function MappingStep({ studyId, upload, traits, initialMapping, onPreviewed, onStartOver }: MappingStepProps) {
  const active = traits.filter((t) => !t.retired);
  const [choices, setChoices] = useState<Choices>(() => {
    if (!initialMapping) return choicesFrom(upload, active);
    const c: Choices = {
      name: initialMapping.name,
      higherTaxon: initialMapping.higherTaxon ?? "",
      firstAppearance: initialMapping.firstAppearance ?? "",
      lastAppearance: initialMapping.lastAppearance ?? "",
      notes: initialMapping.notes ?? "",
    };
    for (const t of active) c[`trait:${t.id}`] = initialMapping.traits[t.id] ?? "";
    return c;
  });
  const [errors, setErrors] = useState<FieldErrors>({});
  const preview = usePreviewImport(studyId);
  const remembered = new Set(upload.rememberedColumns);
  const used = new Set(Object.values(choices).filter(Boolean));
  const leftOut = upload.columns.filter((c) => !used.has(c));
  const options = [{ value: "", label: "— Not imported —" }, ...upload.columns.map((c) => ({ value: c, label: c }))];

  function choose(key: string, header: string) {
    setChoices((c) => ({ ...c, [key]: header }));
    setErrors((e) => {
      const next = { ...e };
      delete next[key];
      return next;
    });
  }

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const parsed = importMappingSchema.safeParse(mappingFrom(choices));
    if (!parsed.success) {
      setErrors(errorsByChoice(issuesToFieldErrors(parsed.error)));
      return;
    }
    preview.mutate(
      { importId: upload.import.id, mapping: parsed.data },
      {
        onSuccess: (result) => onPreviewed(parsed.data, result),
        onError: (error) => {
          if (error instanceof ApiError) setErrors(errorsByChoice(error.fields));
        },
      },
    );
  }

  const hintFor = (key: string, base?: string) => {
    const header = choices[key];
    const note = header && remembered.has(header) ? "Mapped as this study mapped it last time." : undefined;
    return [base, note].filter(Boolean).join(" ") || undefined;
  };

  return (
    <form noValidate onSubmit={submit} className="space-y-6" aria-label="Map the columns">
      <p className="text-[15px] text-stone-700">
        <span className="font-medium text-stone-900">{upload.import.fileName}</span>: {formatCount(upload.rowCount)} rows, {DELIMITER_NAMES[upload.delimiter] ?? upload.delimiter}{" "}
        separated, {upload.encoding.toUpperCase()}
        {upload.hadBom ? " with a byte-order mark" : ""}.
      </p>
      <FormError message={preview.error && !(preview.error instanceof ApiError && Object.keys(preview.error.fields).length) ? errorMessage(preview.error) : null} />

      <fieldset>
        <legend className="text-sm font-semibold tracking-wide text-stone-500 uppercase">Taxon</legend>
        <div className="mt-3 grid gap-x-6 gap-y-4 md:grid-cols-2">
          {TAXON_TARGETS.map((t) => (
            <Select key={t.key} label={t.label} options={options} value={choices[t.key]} error={errors[t.key]} hint={hintFor(t.key, t.hint)} onChange={(e) => choose(t.key, e.target.value)} />
          ))}
        </div>
      </fieldset>

      <fieldset>
        <legend className="text-sm font-semibold tracking-wide text-stone-500 uppercase">Traits of the codebook</legend>
        {active.length === 0 ? (
          <p className="mt-2 text-[15px] text-stone-500">The codebook has no traits in use: only names, ranges and notes can be imported.</p>
        ) : (
          <div className="mt-3 grid gap-x-6 gap-y-4 md:grid-cols-2">
            {active.map((t) => (
              <Select
                key={t.id}
                label={t.label}
                options={options}
                value={choices[`trait:${t.id}`] ?? ""}
                error={errors[`trait:${t.id}`]}
                hint={hintFor(`trait:${t.id}`, t.kind === "numeric" ? `A number${t.unit ? ` in ${t.unit}` : ""}.` : `States: ${t.states.map((s) => s.code).join(", ")}.`)}
                onChange={(e) => choose(`trait:${t.id}`, e.target.value)}
              />
            ))}
          </div>
        )}
      </fieldset>

      {leftOut.length > 0 && (
        <p className="text-sm text-stone-600">
          <span className="font-medium text-stone-800">Not imported:</span> {leftOut.join(", ")}
        </p>
      )}

      {upload.sampleRows.length > 0 && (
        <details className="rounded-lg border border-stone-200">
          <summary className="cursor-pointer px-4 py-2 text-sm font-medium text-stone-700">The file’s first rows</summary>
          <div className="overflow-x-auto border-t border-stone-100">
            <SampleRowsTable columns={upload.columns} rows={upload.sampleRows} caption="The first rows of the file" />
          </div>
        </details>
      )}

      <MappingStepActions onStartOver={onStartOver} checking={preview.isPending} />
    </form>
  );
}
