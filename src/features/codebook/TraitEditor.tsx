import { useMemo, useState, type FormEvent } from "react";
import { TRAIT_KINDS, type NumericTransform, type TraitAspect, type TraitKind } from "@shared/codebook";
import { requiredReasonSchema } from "@shared/schemas/taxa";
import { traitChangeConflictSchema, traitUpdateSchema, type Trait, type TraitChangeConflict } from "@shared/schemas/traits";
import { Button } from "../../components/Button";
import { Card } from "../../components/Card";
import { FormError, Notice } from "../../components/Notice";
import { Select } from "../../components/Select";
import { TextArea, TextField } from "../../components/TextField";
import { useToast } from "../../components/Toast";
import { ApiError, errorMessage } from "../../lib/api";
import { issuesToFieldErrors, type FieldErrors } from "../../lib/forms";
import { pluralize } from "../../lib/format";
import { useCreateTrait, useTraitUsage, useUpdateTrait } from "./api";
import { CLEAR_CHOICE, RemapPanel, type AffectedState } from "./RemapPanel";
import { StatesEditor } from "./StatesEditor";
import { changesFrom, checkDraft, draftFromTrait, emptyDraft, newStateDraft, removedCodes, type TraitDraft } from "./traitDraft";

const KIND_LABELS: Record<TraitKind, string> = {
  binary: "Binary: two states",
  categorical: "Categorical: states in no order",
  ordinal: "Ordinal: ranked states",
  numeric: "Numeric: a number with a unit",
};
const KIND_OPTIONS = TRAIT_KINDS.map((kind) => ({ value: kind, label: KIND_LABELS[kind] }));
const ASPECT_OPTIONS: Array<{ value: TraitAspect; label: string }> = [
  { value: "ecology", label: "Ecology" },
  { value: "other", label: "Something else" },
];
const TRANSFORM_OPTIONS: Array<{ value: NumericTransform; label: string }> = [
  { value: "none", label: "Use the value as given" },
  { value: "log10", label: "Use its base-10 logarithm (for sizes and other skewed values)" },
];

/** A key from a label while creating: "Body size (mm)" -> "body_size_mm". */
function keyFromLabel(label: string): string {
  const key = label
    .toLowerCase()
    .normalize("NFD")
    .replace(/[\u0300-\u036f]/g, "")
    .replace(/[^a-z0-9]+/g, "_")
    .replace(/^_+|_+$/g, "")
    .slice(0, 60);
  return /^[0-9]/.test(key) ? `t_${key}` : key;
}

interface TraitEditorProps {
  studyId: string;
  /** The trait to edit; a new trait when absent. */
  trait?: Trait;
  onDone: () => void;
}

type Refusal = { kind: "out_of_range" | "kind_in_use"; conflict: TraitChangeConflict };

export function TraitEditor({ studyId, trait, onDone }: TraitEditorProps) {
  const toast = useToast();
  const create = useCreateTrait(studyId);
  const update = useUpdateTrait(studyId);
  const usage = useTraitUsage(studyId, trait && trait.kind !== "numeric" ? trait.id : null);
  const [draft, setDraft] = useState<TraitDraft>(() => (trait ? draftFromTrait(trait) : emptyDraft()));
  const [keyTouched, setKeyTouched] = useState(Boolean(trait));
  const [errors, setErrors] = useState<FieldErrors>({});
  const [remapFor, setRemapFor] = useState<AffectedState[] | null>(null);
  const [choices, setChoices] = useState<Record<string, string>>({});
  const [reason, setReason] = useState("");
  const [refusal, setRefusal] = useState<Refusal | null>(null);
  const [serverError, setServerError] = useState<string | null>(null);

  const heldBy = useMemo(() => new Map((usage.data?.byState ?? []).map((s) => [s.code, s.count])), [usage.data]);
  const busy = create.isPending || update.isPending;
  const title = trait ? `Edit “${trait.label}”` : "New trait";

  function patch(next: Partial<TraitDraft>) {
    setDraft((current) => {
      const merged = { ...current, ...next };
      if (!keyTouched && next.label !== undefined) merged.key = keyFromLabel(next.label);
      // A binary trait always shows its two rows.
      if (merged.kind === "binary") while (merged.states.length < 2) merged.states = [...merged.states, newStateDraft()];
      return merged;
    });
    setErrors({});
    setRefusal(null);
    setServerError(null);
    // A different list of states may remove different ones: ask again on saving.
    if (next.states !== undefined || next.kind !== undefined) setRemapFor(null);
  }

  /** Default targets: a row whose code was renamed takes its old code's values. */
  function startRemap(affected: AffectedState[]) {
    const defaults: Record<string, string> = {};
    for (const a of affected) {
      const renamed = draft.states.find((s) => s.originalCode === a.code && s.code.trim() !== "");
      defaults[a.code] = renamed ? renamed.code.trim() : (choices[a.code] ?? "");
    }
    setChoices(defaults);
    setRemapFor(affected);
  }

  function handleError(error: unknown) {
    if (error instanceof ApiError && error.status === 409) {
      const parsed = traitChangeConflictSchema.safeParse(error.body);
      if (parsed.success) {
        const { code } = parsed.data.error;
        if (code === "states_in_use") {
          startRemap(parsed.data.affected.map((a) => ({ code: a.code ?? "", label: a.label, count: a.count, sample: a.sample })));
          setServerError(parsed.data.error.message);
          return;
        }
        setRefusal({ kind: code === "values_out_of_range" ? "out_of_range" : "kind_in_use", conflict: parsed.data });
        return;
      }
    }
    if (error instanceof ApiError && Object.keys(error.fields).length > 0) {
      setErrors(error.fields);
      setServerError("Check the fields marked below.");
      return;
    }
    setServerError(errorMessage(error));
  }

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const checked = checkDraft(draft);
    if (!checked.ok) {
      setErrors(checked.errors);
      return;
    }

    if (!trait) {
      create.mutate(checked.input, {
        onSuccess: (created) => {
          toast.show(`Added “${created.label}” to the codebook.`);
          onDone();
        },
        onError: handleError,
      });
      return;
    }

    const changes = changesFrom(trait, checked.input);
    if (Object.keys(changes).length === 0) {
      toast.show("Nothing changed.", "info");
      onDone();
      return;
    }

    const removed = removedCodes(trait, draft);
    let remap: Record<string, string | null> | undefined;
    if (removed.length > 0) {
      const affected = remapFor ?? (usage.data?.byState ?? []).filter((s) => removed.includes(s.code) && s.count > 0);
      if (affected.length > 0 && !remapFor) {
        // First say which taxa hold the states, and ask where they go.
        startRemap(affected);
        return;
      }
      if (remapFor) {
        const problems: FieldErrors = {};
        remap = {};
        for (const a of remapFor) {
          const choice = choices[a.code] ?? "";
          if (choice === "") problems[`remap.${a.code}`] = `Choose where the values “${a.code}” go`;
          else remap[a.code] = choice === CLEAR_CHOICE ? null : choice;
        }
        const reasonCheck = requiredReasonSchema.safeParse(reason);
        if (!reasonCheck.success) problems.reason = reasonCheck.error.issues[0].message;
        if (Object.keys(problems).length > 0) {
          setErrors(problems);
          return;
        }
      }
    }

    const body = { ...changes, ...(remap ? { remap, reason } : {}) };
    const parsed = traitUpdateSchema.safeParse(body);
    if (!parsed.success) {
      setErrors(issuesToFieldErrors(parsed.error));
      return;
    }
    update.mutate(
      { traitId: trait.id, changes: body },
      {
        onSuccess: (result) => {
          toast.show(result.remapped > 0 ? `Saved “${result.trait.label}”; ${pluralize(result.remapped, "value")} moved.` : `Saved “${result.trait.label}”.`);
          onDone();
        },
        onError: handleError,
      },
    );
  }

  const targets = draft.kind === "numeric" ? [] : draft.states.filter((s) => s.code.trim() !== "").map((s) => ({ code: s.code.trim(), label: s.label.trim() || s.code.trim() }));

  return (
    <Card title={title} description={trait ? <span className="font-mono">{trait.key}</span> : "Define what is recorded for every taxon, and how."}>
      <form noValidate onSubmit={submit} className="space-y-5" aria-label={title}>
        <FormError message={serverError} />
        <div className="grid gap-5 md:grid-cols-2">
          <TextField label="Label" value={draft.label} error={errors.label} onChange={(e) => patch({ label: e.target.value })} autoFocus={!trait} />
          <TextField
            label="Key"
            hint="Lower-case letters, digits and _; the column name in CSV files."
            value={draft.key}
            error={errors.key}
            spellCheck={false}
            autoComplete="off"
            onChange={(e) => {
              setKeyTouched(true);
              patch({ key: e.target.value });
            }}
          />
          <Select label="Kind" options={KIND_OPTIONS} value={draft.kind} error={errors.kind} onChange={(e) => patch({ kind: e.target.value as TraitKind })} />
          <Select
            label="What it describes"
            hint="Ecology: habitat, feeding, life habit, size, range or environment."
            options={ASPECT_OPTIONS}
            value={draft.aspect}
            error={errors.aspect}
            onChange={(e) => patch({ aspect: e.target.value as TraitAspect })}
          />
        </div>

        {draft.kind === "numeric" ? (
          <div className="grid gap-5 md:grid-cols-2">
            <TextField label="Unit" optional placeholder="e.g. mm" value={draft.unit} error={errors.unit} onChange={(e) => patch({ unit: e.target.value })} />
            <Select
              label="In analyses"
              options={TRANSFORM_OPTIONS}
              value={draft.transform}
              error={errors.transform}
              onChange={(e) => patch({ transform: e.target.value as NumericTransform })}
            />
            <TextField label="Minimum" optional inputMode="decimal" value={draft.minValue} error={errors.minValue} onChange={(e) => patch({ minValue: e.target.value })} />
            <TextField label="Maximum" optional inputMode="decimal" value={draft.maxValue} error={errors.maxValue} onChange={(e) => patch({ maxValue: e.target.value })} />
          </div>
        ) : (
          <StatesEditor kind={draft.kind} states={draft.states} errors={errors} heldBy={heldBy} onChange={(states) => patch({ states })} />
        )}

        <TextArea
          label="Coding rule"
          hint="How a coder decides the value; shown beside the column in the trait table."
          rows={3}
          value={draft.codingRule}
          error={errors.codingRule}
          onChange={(e) => patch({ codingRule: e.target.value })}
        />

        {remapFor && remapFor.length > 0 && (
          <RemapPanel
            traitLabel={draft.label || trait?.label || "this trait"}
            affected={remapFor}
            targets={targets}
            choices={choices}
            reason={reason}
            errors={errors}
            onChoice={(code, target) => {
              setChoices((c) => ({ ...c, [code]: target }));
              setErrors((e) => {
                const next = { ...e };
                delete next[`remap.${code}`];
                return next;
              });
            }}
            onReason={setReason}
          />
        )}

        {refusal && <RefusalNotice refusal={refusal} />}

        <div className="flex flex-col-reverse gap-3 border-t border-stone-100 pt-4 sm:flex-row sm:justify-end">
          <Button variant="secondary" onClick={onDone} disabled={busy}>
            Cancel
          </Button>
          <Button type="submit" busy={busy}>
            {trait ? (remapFor && remapFor.length > 0 ? "Save and move the values" : "Save trait") : "Add trait"}
          </Button>
        </div>
      </form>
    </Card>
  );
}

function RefusalNotice({ refusal }: { refusal: Refusal }) {
  const { conflict } = refusal;
  return (
    <Notice tone="error" title={refusal.kind === "out_of_range" ? "Some values fall outside the new range" : "Taxa hold values of this kind"}>
      <p>{conflict.error.message}</p>
      {conflict.affected.length > 0 && (
        <ul className="mt-2 list-disc space-y-1 pl-5 text-sm">
          {conflict.affected.map((a, i) => (
            <li key={`${a.code ?? "value"}-${i}`}>
              {a.label || a.code || "Values"}: {pluralize(a.count, "taxon", "taxa")}
              {a.sample.length > 0 && <> — {a.sample.map((t) => `${t.name} (${t.value})`).join(", ")}</>}
            </li>
          ))}
        </ul>
      )}
      <p className="mt-2 text-sm">Change those values in the trait table first, or keep the definition as it is.</p>
    </Notice>
  );
}
