// The codebook's pointer to the study's own time bins: how many there are, and where to edit them.
import { ButtonLink } from "../../components/Button";
import { Card } from "../../components/Card";
import { agesWriter, pluralize } from "../../lib/format";
import { useTimeBins } from "../../lib/queries/timeBins";

export function TimeBinsSummary({ studyId }: { studyId: string }) {
  const bins = useTimeBins(studyId);
  const list = bins.data?.bins ?? [];
  const ages = agesWriter(list.flatMap((b) => [b.baseMa, b.topMa]));
  const summary = bins.isPending
    ? "Loading the time bins…"
    : bins.isError
      ? "The time bins could not be loaded."
      : list.length === 0
        ? "None: interval names are read from the ICS chart alone."
        : `${pluralize(list.length, "bin")}, from ${list[0]!.name} (${ages.ma(list[0]!.baseMa)}) to ${list.at(-1)!.name} (${ages.ma(list.at(-1)!.topMa)}). Their names are read before the ICS chart's.`;
  return (
    <Card
      title="Time bins of this study"
      description="Regional stages or numbered slices, accepted wherever an interval name is: the trait table, its imports and the occurrence uploads."
      actions={
        <ButtonLink variant="secondary" size="sm" to={`/studies/${studyId}/codebook/time-bins`}>
          {list.length ? "Open time bins" : "Define time bins"}
        </ButtonLink>
      }
      className="mt-6"
    >
      <p className="text-sm text-stone-700" data-testid="time-bins-summary">
        {summary}
      </p>
    </Card>
  );
}
