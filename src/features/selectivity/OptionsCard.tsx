import { useId } from "react";
import { CORRECTIONS, CORRECTION_LABELS, type RunParams } from "@shared/schemas/runs";
import { Card } from "../../components/Card";
import { Select } from "../../components/Select";
import type { FieldErrors } from "../../lib/forms";
import type { Draft } from "./configDraft";
import { SamplingCovariatesField } from "./SamplingCovariatesField";

const LEVELS = [0.9, 0.95, 0.99];
const MIN_CLADES = [1, 2, 3, 4, 5, 8, 10];
const THRESHOLDS = [0.05, 0.1, 0.15, 0.2, 0.25];

export interface OptionsCardProps {
  draft: Draft;
  errors: FieldErrors;
  onChange: (next: Partial<Draft>) => void;
}

/** How the tests are run: the clade level of the adjusted odds ratios, the correction, Firth, the interval level, the confounding flag. */
export function OptionsCard({ draft, errors, onChange }: OptionsCardProps) {
  const firthId = useId();
  const firthHint = useId();
  return (
    <Card title="3. How to test" description="The defaults suit most studies.">
      <div className="grid gap-5 sm:grid-cols-2">
        <Select
          label="Adjust for clade by"
          value="higherTaxon"
          error={errors.stratifyBy}
          hint="Clade-adjusted odds ratios pool one table per clade (Mantel-Haenszel). The trait table holds one clade level, the higher taxon."
          onChange={() => undefined}
          options={[{ value: "higherTaxon", label: "Higher taxon (the trait table’s clade column)" }]}
        />
        <Select
          label="Multiple-testing correction"
          value={draft.correction}
          error={errors.correction}
          hint="Adjusts the p-values over all traits and boundaries of the run."
          onChange={(event) => onChange({ correction: event.target.value as RunParams["correction"] })}
          options={CORRECTIONS.map((c) => ({ value: c, label: c === "bh" ? `${CORRECTION_LABELS[c]}, default` : CORRECTION_LABELS[c] }))}
        />
        <Select
          label="Interval level"
          value={String(draft.level)}
          error={errors.level}
          onChange={(event) => onChange({ level: Number(event.target.value) })}
          options={LEVELS.map((l) => ({ value: String(l), label: `${Math.round(l * 100)}%${l === 0.95 ? " (default)" : ""}` }))}
        />
        <Select
          label="Flag possible confounding when an odds ratio moves by more than"
          value={String(draft.confoundingThreshold)}
          error={errors.confoundingThreshold}
          hint="The change-in-estimate rule, a rule of thumb of common practice."
          onChange={(event) => onChange({ confoundingThreshold: Number(event.target.value) })}
          options={THRESHOLDS.map((t) => ({ value: String(t), label: `${Math.round(t * 100)}%${t === 0.1 ? " (default)" : ""}` }))}
        />
        <Select
          label="Clade-adjusted estimates need at least this many informative clades"
          value={String(draft.minInformativeClades)}
          error={errors.minInformativeClades}
          hint="Fewer, and the estimate is marked thin and never flags confounding on its own."
          onChange={(event) => onChange({ minInformativeClades: Number(event.target.value) })}
          options={MIN_CLADES.map((m) => ({ value: String(m), label: `${m}${m === 3 ? " (default)" : ""}` }))}
        />
      </div>
      <div className="mt-5 flex items-start gap-3">
        <input
          id={firthId}
          type="checkbox"
          checked={draft.forceFirth}
          aria-describedby={firthHint}
          onChange={(event) => onChange({ forceFirth: event.target.checked })}
          className="mt-1 size-4 shrink-0 rounded border-stone-300 accent-accent-600"
        />
        <div>
          <label htmlFor={firthId} className="text-[15px] font-medium text-stone-900">
            Always fit Firth’s bias-reduced regression
          </label>
          <p id={firthHint} className="text-sm text-stone-500">
            Off: used only when the data separate (a state with only victims or only survivors). On: used even when they do not, e.g. for small samples.
          </p>
          {errors.forceFirth && <p className="text-sm font-medium text-red-700">{errors.forceFirth}</p>}
        </div>
      </div>
      <SamplingCovariatesField draft={draft} error={errors.samplingCovariates} onChange={onChange} />
    </Card>
  );
}
