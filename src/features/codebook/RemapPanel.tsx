import { Select } from "../../components/Select";
import { TextArea } from "../../components/TextField";
import { pluralize } from "../../lib/format";

/** A removed state and the taxa that hold it. */
export interface AffectedState {
  code: string;
  label: string;
  count: number;
  sample: Array<{ id: string; name: string }>;
}

/** The value of the "move to" choice that clears the values instead. */
export const CLEAR_CHOICE = "__clear__";

interface RemapPanelProps {
  traitLabel: string;
  affected: AffectedState[];
  /** The states the trait will have after saving. */
  targets: Array<{ code: string; label: string }>;
  choices: Record<string, string>;
  reason: string;
  errors: Record<string, string>;
  onChoice: (code: string, target: string) => void;
  onReason: (reason: string) => void;
}

/**
 * Before states that taxa hold are removed, the person says where those values go: to a state
 * that stays, or cleared. Nothing is orphaned silently; each moved value is one coding decision.
 */
export function RemapPanel({ traitLabel, affected, targets, choices, reason, errors, onChoice, onReason }: RemapPanelProps) {
  const total = affected.reduce((sum, a) => sum + a.count, 0);
  const options = [
    { value: "", label: "Choose where they go…" },
    ...targets.map((t) => ({ value: t.code, label: `${t.label} (${t.code})` })),
    { value: CLEAR_CHOICE, label: "Clear the value (leave it missing)" },
  ];
  return (
    <section aria-labelledby="remap-title" className="rounded-lg border border-caution-200 bg-caution-50 px-4 py-4">
      <h3 id="remap-title" className="font-semibold text-caution-700">
        {pluralize(total, "value")} of {traitLabel} use states you are removing
      </h3>
      <p className="mt-1 text-sm text-stone-700">
        Say where each state’s values go. Every moved or cleared value is recorded as a coding decision with the reason below, and can be reverted.
      </p>
      <ul className="mt-4 space-y-4">
        {affected.map((state) => (
          <li key={state.code} className="rounded-md border border-stone-200 bg-white px-4 py-3" data-removed-state={state.code}>
            <p className="font-medium text-stone-900">
              “{state.label || state.code}” <span className="font-mono text-sm text-stone-500">{state.code}</span> — held by {pluralize(state.count, "taxon", "taxa")}
            </p>
            {state.sample.length > 0 && (
              <p className="mt-1 text-sm text-stone-600">
                <span className="sr-only">For example: </span>
                {state.sample.map((t) => t.name).join(", ")}
                {state.count > state.sample.length && ` and ${pluralize(state.count - state.sample.length, "more")}`}
              </p>
            )}
            <Select
              label={`Move the values “${state.code}” to`}
              options={options}
              value={choices[state.code] ?? ""}
              error={errors[`remap.${state.code}`]}
              onChange={(e) => onChoice(state.code, e.target.value)}
              className="mt-3 max-w-md"
            />
          </li>
        ))}
      </ul>
      <TextArea
        label="Reason for moving these values"
        hint="Recorded on every coding decision this change writes."
        rows={2}
        value={reason}
        error={errors.reason}
        onChange={(e) => onReason(e.target.value)}
        className="mt-4"
      />
    </section>
  );
}
