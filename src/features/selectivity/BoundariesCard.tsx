import { useState } from "react";
import { z } from "zod";
import { RUN_MAX_BOUNDARIES, runBoundaryParamsSchema } from "@shared/schemas/runs";
import type { Timescale, TimescaleUnitDto } from "@shared/schemas/timescale";
import { Button } from "../../components/Button";
import { Card } from "../../components/Card";
import { formatMa, formatMyr, RANK_WORD } from "../../components/timescale/ages";
import { PickModeSwitch, type BoundaryPickMode } from "../../components/timescale/PickModeSwitch";
import type { ScaleIndex } from "../../components/timescale/scaleIndex";
import { UnitSelects } from "../../components/timescale/UnitSelects";
import { TextField } from "../../components/TextField";
import type { FieldErrors } from "../../lib/forms";
import { useZodForm } from "../../lib/forms";
import { boundaryKey, boundaryName, type DraftBoundary } from "./configDraft";

// The add-a-boundary form reads its text fields through the run schema's own boundary fields.
const blank = (value: unknown) => (typeof value === "string" && value.trim() === "" ? undefined : value);
const number = (value: unknown) => (typeof value === "string" ? (value.trim() === "" ? undefined : Number(value.trim())) : value);
const addBoundarySchema = z.object({
  boundaryMa: z.preprocess(number, runBoundaryParamsSchema.shape.boundaryMa),
  windowMyr: z.preprocess(number, runBoundaryParamsSchema.shape.windowMyr),
  label: z.preprocess(blank, runBoundaryParamsSchema.shape.label),
});

const EMPTY_FORM = { boundaryMa: "", windowMyr: "", label: "" };

export interface BoundariesCardProps {
  timescale: Timescale;
  scale: ScaleIndex;
  boundaries: DraftBoundary[];
  /** Messages from the run schema or the server, keyed like "boundaries.0.windowMyr". */
  errors: FieldErrors;
  onChange: (boundaries: DraftBoundary[]) => void;
  /** The boundary named as the crisis, for crisis against background (two or more boundaries). */
  crisisKey?: string;
  onCrisisChange?: (key: string | undefined) => void;
  /** The robustness panel's settings as typed. */
  robustness?: { windowFactors?: string; truncationMyr?: string };
  onRobustnessChange?: (next: { windowFactors?: string; truncationMyr?: string }) => void;
}

/** Default window words: "the Maastrichtian, 6.2 Myr", or for an age inside a stage "down to the base of the Cenomanian, 6.3 Myr". */
function defaultWindowWords(scale: ScaleIndex, age: number): string {
  const fallback = scale.defaultWindow(age);
  if (!fallback) return "none: no stage lies below this age, give a window";
  return fallback.wholeStage
    ? `the ${fallback.stage.label}, ${formatMyr(fallback.windowMyr)}`
    : `down to the base of the ${fallback.stage.label} (the stage this age falls in), ${formatMyr(fallback.windowMyr)}`;
}

/** The boundaries a run tests: one crisis, or a crisis beside background boundaries to set it against. */
export function BoundariesCard({ timescale, scale, boundaries, errors, onChange, crisisKey, onCrisisChange, robustness, onRobustnessChange }: BoundariesCardProps) {
  const full = boundaries.length >= RUN_MAX_BOUNDARIES;
  return (
    <Card
      title="1. Boundaries"
      description={`The boundary of the time scale across which taxa are sorted into survivors and victims, and the window below it in which a last appearance counts as a loss. Add background boundaries (up to ${RUN_MAX_BOUNDARIES}) to set a crisis against ordinary times.`}
    >
      {boundaries.length === 0 ? (
        <p className="rounded-lg border border-dashed border-stone-300 px-4 py-5 text-center text-[15px] text-stone-500">No boundary chosen yet. Add one below.</p>
      ) : (
        <ol className="space-y-2" aria-label="Chosen boundaries">
          {boundaries.map((b, i) => {
            const name = boundaryName(scale, b);
            const problems = [errors[`boundaries.${i}.boundaryMa`], errors[`boundaries.${i}.windowMyr`], errors[`boundaries.${i}.label`], errors[`boundaries.${i}`]].filter(Boolean);
            return (
              <li
                key={b.key}
                data-boundary-item={b.boundaryMa}
                className={`flex flex-wrap items-center justify-between gap-3 rounded-lg border px-4 py-3 ${problems.length ? "border-red-300 bg-red-50/50" : "border-stone-200 bg-stone-50"}`}
              >
                <div className="min-w-0">
                  <p className="font-medium text-stone-900">
                    {i + 1}. {name} <span className="font-normal text-stone-600">· {formatMa(b.boundaryMa)}</span>
                  </p>
                  <p className="text-sm text-stone-600">Window: {b.windowMyr !== undefined ? formatMyr(b.windowMyr) : `the default, ${defaultWindowWords(scale, b.boundaryMa)}`}</p>
                  {problems.map((problem) => (
                    <p key={problem} className="mt-1 text-sm font-medium text-red-700">
                      {problem}
                    </p>
                  ))}
                </div>
                <Button variant="ghost" size="sm" onClick={() => onChange(boundaries.filter((other) => other.key !== b.key))} aria-label={`Remove boundary ${i + 1}, ${name}`}>
                  Remove
                </Button>
              </li>
            );
          })}
        </ol>
      )}
      {errors.boundaries && <p className="mt-2 text-sm font-medium text-red-700">{errors.boundaries}</p>}
      {onCrisisChange && boundaries.length > 1 && (
        <CrisisChoice scale={scale} boundaries={boundaries} crisisKey={crisisKey} error={errors.crisisBoundary} onChange={onCrisisChange} />
      )}
      {onRobustnessChange && boundaries.length > 0 && <RobustnessSettings value={robustness ?? {}} errors={errors} onChange={onRobustnessChange} />}

      {full ? (
        <p className="mt-5 text-sm text-stone-600">A run tests at most {RUN_MAX_BOUNDARIES} boundaries; remove one to add another.</p>
      ) : (
        <AddBoundary key={boundaries.length} scale={scale} boundaries={boundaries} onAdd={(b) => onChange([...boundaries, b])} />
      )}

      <p className="mt-6 border-t border-stone-100 pt-4 text-sm text-stone-500">
        Time scale: {timescale.citation}
        {timescale.citation.includes(timescale.version) ? "" : `, version ${timescale.version}`}. Ages in Ma, older ages larger. Outcomes set by hand on the
        Boundary screen apply.
      </p>
    </Card>
  );
}

/** The robustness panel's alternative windows and truncation distance; empty fields keep the defaults. */
function RobustnessSettings({
  value,
  errors,
  onChange,
}: {
  value: { windowFactors?: string; truncationMyr?: string };
  errors: FieldErrors;
  onChange: (next: { windowFactors?: string; truncationMyr?: string }) => void;
}) {
  const factorErrors = Object.entries(errors)
    .filter(([key]) => key === "robustness.windowFactors" || key.startsWith("robustness.windowFactors."))
    .map(([, message]) => message);
  return (
    <fieldset className="mt-5 rounded-lg border border-stone-200 px-4 py-3" data-testid="robustness-settings">
      <legend className="px-1 text-sm font-semibold text-stone-900">Robustness panel</legend>
      <p className="mb-3 text-sm text-stone-600">
        Every run re-estimates its odds ratios under other windows, without each clade, without single-stage taxa and with last appearances near the boundary recoded.
      </p>
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField
          label="Other windows (multiples of each boundary's window)"
          optional
          autoComplete="off"
          hint="Empty: 0.5, 1.5, 2. Up to six numbers, separated by commas."
          value={value.windowFactors ?? ""}
          onChange={(event) => onChange({ ...value, windowFactors: event.target.value })}
          error={factorErrors[0]}
        />
        <TextField
          label="Truncation distance (Myr)"
          optional
          inputMode="decimal"
          autoComplete="off"
          hint="Empty: a quarter of each boundary's window."
          value={value.truncationMyr ?? ""}
          onChange={(event) => onChange({ ...value, truncationMyr: event.target.value })}
          error={errors["robustness.truncationMyr"]}
        />
      </div>
    </fieldset>
  );
}

/** Which boundary is the crisis: its selectivity is then tested against the others' (background). */
function CrisisChoice({
  scale,
  boundaries,
  crisisKey,
  error,
  onChange,
}: {
  scale: ScaleIndex;
  boundaries: DraftBoundary[];
  crisisKey?: string;
  error?: string;
  onChange: (key: string | undefined) => void;
}) {
  const chosen = boundaries.some((b) => b.key === crisisKey) ? crisisKey : undefined;
  const option = "flex items-center gap-2 rounded-md px-2 py-1 text-[15px] text-stone-800 hover:bg-stone-50";
  return (
    <fieldset className="mt-5 rounded-lg border border-stone-200 px-4 py-3" data-testid="crisis-choice">
      <legend className="px-1 text-sm font-semibold text-stone-900">Crisis against background</legend>
      <p className="mb-2 text-sm text-stone-600">
        Name the crisis to test, trait by trait, whether its selectivity differs from that at the other boundaries (an interaction in one logistic model; Jablonski 1986).
      </p>
      <div className="grid gap-1 sm:grid-cols-2">
        <label className={option}>
          <input type="radio" name="crisis-boundary" checked={chosen === undefined} onChange={() => onChange(undefined)} />
          No crisis named (no such test)
        </label>
        {boundaries.map((b, i) => (
          <label key={b.key} className={option}>
            <input type="radio" name="crisis-boundary" checked={chosen === b.key} onChange={() => onChange(b.key)} />
            {i + 1}. {boundaryName(scale, b)} is the crisis
          </label>
        ))}
      </div>
      {error && <p className="mt-2 text-sm font-medium text-red-700">{error}</p>}
    </fieldset>
  );
}

function AddBoundary({ scale, boundaries, onAdd }: { scale: ScaleIndex; boundaries: DraftBoundary[]; onAdd: (b: DraftBoundary) => void }) {
  const [mode, setMode] = useState<BoundaryPickMode>("unit");
  const [unit, setUnit] = useState<TimescaleUnitDto | undefined>(undefined);
  const [duplicate, setDuplicate] = useState<string | null>(null);
  const form = useZodForm(addBoundarySchema, EMPTY_FORM);
  const age = mode === "unit" ? unit?.base : Number(form.values.boundaryMa);
  const ageKnown = age !== undefined && Number.isFinite(age) && form.values.boundaryMa.trim() !== "";

  const chooseUnit = (next: TimescaleUnitDto) => {
    setUnit(next);
    setDuplicate(null);
    form.setValue("boundaryMa", String(next.base));
  };
  const switchMode = (next: BoundaryPickMode) => {
    setMode(next);
    setUnit(undefined);
    setDuplicate(null);
    form.setValue("boundaryMa", "");
  };

  return (
    <form
      noValidate
      aria-label="Add a boundary"
      className="mt-5 rounded-lg border border-stone-200 px-4 py-4"
      onSubmit={form.handleSubmit((data) => {
        const same = boundaries.findIndex((b) => b.boundaryMa === data.boundaryMa && b.windowMyr === data.windowMyr);
        if (same >= 0) {
          setDuplicate(`Boundary ${same + 1} already has this age and window.`);
          return;
        }
        // A unit chosen by name names the boundary (the server would name the broadest unit sharing the age).
        const label = data.label ?? (mode === "unit" && unit ? `Base of the ${unit.label}` : undefined);
        onAdd({ key: boundaryKey(), boundaryMa: data.boundaryMa, windowMyr: data.windowMyr, label });
      })}
    >
      <p className="mb-3 text-sm font-semibold text-stone-900">{boundaries.length === 0 ? "Add the boundary" : "Add another boundary"}</p>
      <PickModeSwitch mode={mode} onChange={switchMode} />
      <div className="mt-4">
        {mode === "unit" ? (
          <>
            <UnitSelects scale={scale} chosenUnit={unit} onChoose={chooseUnit} />
            {form.errors.boundaryMa && <p className="mt-1 text-sm font-medium text-red-700">Choose a period, epoch or stage whose base is the boundary.</p>}
          </>
        ) : (
          <TextField
            label="Boundary age (Ma)"
            inputMode="decimal"
            autoComplete="off"
            hint="Any age older than the present, e.g. 201.4. Use a point for decimals."
            className="w-full sm:w-72"
            {...form.field("boundaryMa")}
          />
        )}
      </div>
      {mode === "unit" && unit && (
        <p className="mt-3 text-[15px] text-stone-800" data-testid="pending-boundary">
          Base of the {unit.label} {RANK_WORD[unit.rank]}, {formatMa(unit.base)}
        </p>
      )}
      <div className="mt-4 grid gap-4 sm:grid-cols-2">
        <TextField
          label="Window below the boundary (Myr)"
          optional
          inputMode="decimal"
          autoComplete="off"
          hint={ageKnown ? `Empty: the default, ${defaultWindowWords(scale, age)}.` : "Empty: the duration of the stage just below the boundary."}
          {...form.field("windowMyr")}
        />
        <TextField label="Name in tables and figures" optional autoComplete="off" hint={mode === "unit" ? "Empty: named after the unit chosen." : "Empty: named from the time scale."} {...form.field("label")} />
      </div>
      {duplicate && (
        <p className="mt-3 text-sm font-medium text-red-700" role="alert">
          {duplicate}
        </p>
      )}
      <Button type="submit" variant="secondary" className="mt-4" disabled={mode === "unit" && !unit}>
        Add boundary
      </Button>
    </form>
  );
}
