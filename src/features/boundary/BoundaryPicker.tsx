import { useState } from "react";
import { z } from "zod";
import { boundaryMaSchema, outcomesQuerySchema } from "@shared/schemas/outcomes";
import type { Timescale, TimescaleUnitDto } from "@shared/schemas/timescale";
import type { DefaultWindow } from "@shared/timescale/defaultWindow";
import { Button } from "../../components/Button";
import { Card } from "../../components/Card";
import { TextField } from "../../components/TextField";
import { formatAgeNumber, formatMa, formatMyr, RANK_WORD } from "../../components/timescale/ages";
import { PickModeSwitch, type BoundaryPickMode } from "../../components/timescale/PickModeSwitch";
import type { ScaleIndex } from "../../components/timescale/scaleIndex";
import { UnitSelects } from "../../components/timescale/UnitSelects";
import { useZodForm } from "../../lib/forms";
import type { BoundaryChoice } from "./boundaryParams";
import { BoundaryStrip } from "./BoundaryStrip";

// Form schemas built from the shared ones the server applies: a custom boundary is the form's
// boundary age, the window is the outcomes query's own window field.
const blankToUndefined = (value: unknown) => (typeof value === "string" && value.trim() === "" ? undefined : typeof value === "string" ? Number(value.trim()) : value);
const customAgeFormSchema = z.object({ boundary: z.preprocess(blankToUndefined, boundaryMaSchema) });
const windowFormSchema = z.object({ window: outcomesQuerySchema.shape.window });

export interface BoundaryPickerProps {
  timescale: Timescale;
  scale: ScaleIndex;
  choice: BoundaryChoice | null;
  /** The chosen unit, when the boundary is the base of one. */
  chosenUnit: TimescaleUnitDto | undefined;
  /** The boundary age in Ma, once known. */
  boundary: number | null;
  /** The window given in the address (undefined: the default). */
  windowParam: number | undefined;
  /** The window in effect, as the server applied it (null while loading). */
  windowInEffect: number | null;
  onChoose: (choice: BoundaryChoice) => void;
  onWindow: (window: number | undefined) => void;
}

export function BoundaryPicker(props: BoundaryPickerProps) {
  const { timescale, scale, choice, chosenUnit, boundary, windowParam, windowInEffect, onChoose, onWindow } = props;
  const [modeChoice, setModeChoice] = useState<BoundaryPickMode | null>(null);
  const mode: BoundaryPickMode = modeChoice ?? choice?.kind ?? "unit";

  const choose = (next: BoundaryChoice) => {
    setModeChoice(null);
    onChoose(next);
  };
  const defaultWindow = boundary === null ? undefined : scale.defaultWindow(boundary);

  return (
    <Card
      title="Boundary and window"
      description="Place the boundary on the International Chronostratigraphic Chart, by period, epoch and stage, or type an age. The window is the stretch of time below the boundary in which a last appearance counts as a loss."
    >
      <PickModeSwitch mode={mode} onChange={setModeChoice} />
      <div className="mt-5">
        {mode === "unit" ? (
          <UnitSelects scale={scale} chosenUnit={chosenUnit} onChoose={(unit) => choose({ kind: "unit", name: unit.name })} />
        ) : (
          <CustomAgeForm key={choice?.kind === "age" ? choice.age : "none"} initialAge={choice?.kind === "age" ? choice.age : undefined} onApply={(age) => choose({ kind: "age", age })} />
        )}
      </div>

      {boundary !== null && <BoundaryHeadline scale={scale} boundary={boundary} chosenUnit={chosenUnit} />}
      {boundary !== null && (
        <BoundaryStrip scale={scale} boundary={boundary} window={windowInEffect} chosenUnit={chosenUnit} onPick={(unit) => choose({ kind: "unit", name: unit.name })} />
      )}

      <WindowForm
        key={windowParam ?? "default"}
        windowParam={windowParam}
        defaultWindow={defaultWindow}
        disabled={choice === null}
        onApply={onWindow}
      />

      <p className="mt-6 border-t border-stone-100 pt-4 text-sm text-stone-500">
        Time scale: {timescale.citation}
        {timescale.citation.includes(timescale.version) ? "" : `, version ${timescale.version}`}. Ages in Ma (millions of years before present): older
        ages are larger.
      </p>
    </Card>
  );
}

function CustomAgeForm({ initialAge, onApply }: { initialAge: number | undefined; onApply: (age: number) => void }) {
  const form = useZodForm(customAgeFormSchema, { boundary: initialAge === undefined ? "" : String(initialAge) });
  return (
    <form noValidate onSubmit={form.handleSubmit((data) => onApply(data.boundary))} className="flex flex-wrap items-start gap-3">
      <TextField
        label="Boundary age (Ma)"
        inputMode="decimal"
        autoComplete="off"
        hint="Any age older than the present, e.g. 94.2. Use a point for decimals."
        className="w-64"
        {...form.field("boundary")}
      />
      <Button type="submit" variant="secondary" className="mt-7">
        Use this age
      </Button>
    </form>
  );
}

/** What the empty window means: a whole stage's duration, or the distance down to the base of the stage a custom age falls in. */
function defaultWindowWords(defaultWindow: DefaultWindow<TimescaleUnitDto> | undefined): string {
  if (!defaultWindow) return "the duration of the stage just below the boundary";
  const { stage, windowMyr, wholeStage } = defaultWindow;
  return wholeStage
    ? `the ${stage.label}’s duration, ${formatMyr(windowMyr)}`
    : `the distance down to the base of the ${stage.label}, the stage this age falls in, ${formatMyr(windowMyr)} (not the stage’s whole ${formatMyr(stage.duration)}, which would run past its base)`;
}

function WindowForm({
  windowParam,
  defaultWindow,
  disabled,
  onApply,
}: {
  windowParam: number | undefined;
  defaultWindow: DefaultWindow<TimescaleUnitDto> | undefined;
  disabled: boolean;
  onApply: (window: number | undefined) => void;
}) {
  const form = useZodForm(windowFormSchema, { window: windowParam === undefined ? "" : String(windowParam) });
  const defaultWords = defaultWindowWords(defaultWindow);
  return (
    <form noValidate onSubmit={form.handleSubmit((data) => onApply(data.window))} className="mt-6 flex flex-wrap items-start gap-3">
      <TextField
        label="Window below the boundary (Myr)"
        inputMode="decimal"
        autoComplete="off"
        disabled={disabled}
        placeholder={defaultWindow ? formatAgeNumber(defaultWindow.windowMyr) : undefined}
        hint={windowParam === undefined ? `Empty: the default, ${defaultWords}.` : `Default: ${defaultWords}. Any length is allowed.`}
        className="w-full sm:w-[26rem]"
        {...form.field("window")}
      />
      <div className="mt-7 flex flex-wrap gap-2">
        <Button type="submit" variant="secondary" disabled={disabled}>
          Apply window
        </Button>
        {windowParam !== undefined && (
          <Button variant="ghost" onClick={() => onApply(undefined)}>
            Use the default
          </Button>
        )}
      </div>
    </form>
  );
}

function BoundaryHeadline({ scale, boundary, chosenUnit }: { scale: ScaleIndex; boundary: number; chosenUnit: TimescaleUnitDto | undefined }) {
  const sharing = scale.withBase(boundary);
  const inside = chosenUnit ? undefined : scale.stageBelow(boundary);
  const named = chosenUnit ?? sharing[sharing.length - 1];
  const others = sharing.filter((u) => u !== named);
  const uncertainty = named?.uncertainty;
  return (
    <div className="mt-6 rounded-lg bg-stone-50 px-4 py-3" data-testid="boundary-headline">
      <p className="text-[15px] text-stone-900">
        <span className="font-semibold">Boundary: </span>
        {named ? (
          <>
            base of the {named.label} {RANK_WORD[named.rank]}, {formatMa(boundary)}
            {uncertainty != null && <span className="text-stone-600"> (± {formatMyr(uncertainty)} on the chart)</span>}
          </>
        ) : (
          <>
            {formatMa(boundary)}, a custom age{inside ? `, inside the ${inside.label}` : ""}
          </>
        )}
      </p>
      {others.length > 0 && (
        <p className="mt-1 text-sm text-stone-600">
          Also the base of the {others.map((u) => `${u.label} ${RANK_WORD[u.rank]}`).join(", the ")}.
        </p>
      )}
    </div>
  );
}

