import type { TimescaleUnitDto } from "@shared/schemas/timescale";
import { Select } from "../Select";
import { formatMa } from "./ages";
import type { ScaleIndex } from "./scaleIndex";

function unitOption(unit: TimescaleUnitDto) {
  return { value: unit.name, label: `${unit.label} · base ${formatMa(unit.base)}` };
}

export interface UnitSelectsProps {
  scale: ScaleIndex;
  /** The unit chosen so far (its period and epoch fill the first two selects). */
  chosenUnit: TimescaleUnitDto | undefined;
  onChoose: (unit: TimescaleUnitDto) => void;
}

/** Period, then epoch, then stage of the time scale: the boundary is the base of the narrowest unit chosen. */
export function UnitSelects({ scale, chosenUnit, onChoose }: UnitSelectsProps) {
  const period = chosenUnit ? scale.ancestor(chosenUnit, "Period") : undefined;
  const epoch = chosenUnit ? scale.ancestor(chosenUnit, "Epoch") : undefined;
  const stage = chosenUnit?.rank === "Age" ? chosenUnit : undefined;
  const epochs = period ? scale.inside(period, "Epoch") : [];
  const stages = epoch ? scale.inside(epoch, "Age") : [];

  const pick = (units: readonly TimescaleUnitDto[], name: string, fallback: TimescaleUnitDto | undefined) => {
    const unit = units.find((u) => u.name === name) ?? fallback;
    if (unit) onChoose(unit);
  };

  return (
    <div>
      <div className="grid gap-4 sm:grid-cols-3">
        <Select
          label="Period"
          value={period?.name ?? ""}
          onChange={(event) => pick(scale.periods, event.target.value, undefined)}
          options={[{ value: "", label: "Choose a period", disabled: true }, ...scale.periods.map(unitOption)]}
        />
        <Select
          label="Epoch"
          value={epoch?.name ?? ""}
          disabled={!period}
          onChange={(event) => pick(epochs, event.target.value, period)}
          options={[{ value: "", label: period ? `None: the ${period.label}’s base` : "Choose a period first" }, ...epochs.map(unitOption)]}
        />
        <Select
          label="Stage"
          value={stage?.name ?? ""}
          disabled={!epoch}
          onChange={(event) => pick(stages, event.target.value, epoch)}
          options={[{ value: "", label: epoch ? `None: the ${epoch.label}’s base` : "Choose an epoch first" }, ...stages.map(unitOption)]}
        />
      </div>
      <p className="mt-2 text-sm text-stone-500">The boundary is the base of the narrowest unit chosen. Listed youngest first, as on the chart.</p>
    </div>
  );
}
