import { useMemo, useState } from "react";
import { z } from "zod";
import { mainBoundaryInputSchema, type Study } from "@shared/schemas/studies";
import type { TimescaleUnitDto } from "@shared/schemas/timescale";
import { Button, ButtonLink } from "../../components/Button";
import { Card } from "../../components/Card";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { FormError } from "../../components/Notice";
import { TextField } from "../../components/TextField";
import { PickModeSwitch, type BoundaryPickMode } from "../../components/timescale/PickModeSwitch";
import { indexScale } from "../../components/timescale/scaleIndex";
import { UnitSelects } from "../../components/timescale/UnitSelects";
import { formatMa, formatMyr } from "../../lib/format";
import { formLevelMessage, useZodForm } from "../../lib/forms";
import { paths } from "../../lib/paths";
import { useTimescale } from "../../lib/queries/timescale";
import { useUpdateStudy } from "./api";

// The age form runs the shared schema on the typed text (a blank or a comma is the person's, the number the schema's).
const toNumber = (value: unknown) => (typeof value === "string" ? (value.trim() === "" ? undefined : Number(value.trim().replace(",", "."))) : value);
const ageFormSchema = z.preprocess((values) => {
  const v = values as { boundaryMa: string };
  return { boundaryMa: toNumber(v.boundaryMa) };
}, mainBoundaryInputSchema);

/** The boundary the study is about: the Boundary screen opens there, the modern comparison starts from it. */
export function MainBoundaryCard({ study, canEdit }: { study: Study; canEdit: boolean }) {
  const [editing, setEditing] = useState(false);
  const main = study.mainBoundary;
  const update = useUpdateStudy(study.id);
  const where = main ? (main.unit ? `base of the ${main.unit}, ${formatMa(main.boundaryMa)}` : formatMa(main.boundaryMa)) : null;

  return (
    <Card
      title="Main boundary"
      description="The boundary this study is about. The Boundary screen opens there, and a modern comparison starts from a run that tests it."
      actions={
        canEdit && !editing ? (
          <Button size="sm" variant="secondary" onClick={() => setEditing(true)}>
            {main ? "Change" : "Set the main boundary"}
          </Button>
        ) : undefined
      }
    >
      {main ? (
        <div className="text-[15px] text-stone-800" data-testid="main-boundary">
          <p>
            <span className="font-semibold">{where}</span>
            {main.windowMyr !== null && <span className="text-stone-600">, window {formatMyr(main.windowMyr)}</span>}
          </p>
          <p className="mt-1 text-sm text-stone-600">
            {main.source === "run" ? `The crisis boundary of the newest run, “${main.runName ?? "a run"}”. A choice made here counts until a newer run.` : "Set on this overview. A newer run’s crisis boundary takes its place."}
          </p>
          <ButtonLink to={`${paths.study(study.id)}/boundary`} variant="ghost" size="sm" className="mt-2 -ml-3">
            Open it on the Boundary screen
          </ButtonLink>
        </div>
      ) : (
        <p className="text-[15px] text-stone-500 italic">
          None yet. {canEdit ? "Set it here, or run a selectivity analysis: its crisis boundary becomes the main boundary." : "The study lead sets it here; a selectivity run’s crisis boundary also becomes the main boundary."}
        </p>
      )}
      {editing && (
        <div className="mt-5 border-t border-stone-100 pt-5">
          <FormError message={formLevelMessage(update.error)} className="mb-4" />
          <MainBoundaryForm
            busy={update.isPending}
            onSave={(input) => update.mutate({ mainBoundary: input }, { onSuccess: () => setEditing(false) })}
            onCancel={() => {
              update.reset();
              setEditing(false);
            }}
            onClear={main?.source === "study" ? () => update.mutate({ mainBoundary: null }, { onSuccess: () => setEditing(false) }) : undefined}
          />
        </div>
      )}
    </Card>
  );
}

function MainBoundaryForm({
  busy,
  onSave,
  onCancel,
  onClear,
}: {
  busy: boolean;
  onSave: (input: { unit: string } | { boundaryMa: number }) => void;
  onCancel: () => void;
  onClear?: () => void;
}) {
  const timescale = useTimescale();
  const scale = useMemo(() => (timescale.data ? indexScale(timescale.data.units) : null), [timescale.data]);
  const [mode, setMode] = useState<BoundaryPickMode>("unit");
  const [chosen, setChosen] = useState<TimescaleUnitDto | undefined>(undefined);
  const form = useZodForm(ageFormSchema, { boundaryMa: "" });

  if (timescale.isPending) return <LoadingState label="Loading the time scale" lines={2} />;
  if (timescale.isError || !scale) return <ErrorState error={timescale.error} title="The time scale could not be loaded" onRetry={() => void timescale.refetch()} />;
  return (
    <div className="space-y-4">
      <PickModeSwitch mode={mode} onChange={setMode} />
      {mode === "unit" ? (
        <div className="space-y-3">
          <UnitSelects scale={scale} chosenUnit={chosen} onChoose={setChosen} />
          <Button variant="secondary" busy={busy} disabled={!chosen} onClick={() => chosen && onSave({ unit: chosen.name })}>
            {chosen ? `Save the base of the ${chosen.label}` : "Save"}
          </Button>
        </div>
      ) : (
        <form noValidate onSubmit={form.handleSubmit((data) => onSave({ boundaryMa: data.boundaryMa as number }))} className="flex flex-wrap items-start gap-3">
          <TextField label="Boundary age (Ma)" inputMode="decimal" autoComplete="off" hint="e.g. 94.2" className="w-64" {...form.field("boundaryMa")} />
          <Button type="submit" variant="secondary" className="mt-7" busy={busy}>
            Save this age
          </Button>
        </form>
      )}
      <div className="flex flex-wrap gap-2">
        <Button size="sm" variant="ghost" onClick={onCancel}>
          Cancel
        </Button>
        {onClear && (
          <Button size="sm" variant="ghost" onClick={onClear}>
            Clear the choice
          </Button>
        )}
      </div>
    </div>
  );
}
