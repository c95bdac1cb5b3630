import { ErrorState } from "../../../components/ErrorState";
import { LoadingState } from "../../../components/LoadingState";
import { formatMa, pluralize } from "../../../lib/format";
import { useTaxonOccurrences } from "./api";

const WIDTH = 560;
const ROW = 10;

/**
 * One taxon's finds on a time axis (older to the left): each find as a bar from its maximum to its minimum age,
 * under the range derived from them, with the list of finds beside.
 */
export function TaxonOccurrences({ studyId, taxon, range }: { studyId: string; taxon: string; range: { fadMa: number; ladMa: number } | null }) {
  const finds = useTaxonOccurrences(studyId, taxon);
  if (finds.isPending) return <LoadingState label={`Loading the finds of ${taxon}`} />;
  if (finds.isError) return <ErrorState error={finds.error} title={`The finds of ${taxon} could not be loaded`} onRetry={() => void finds.refetch()} />;
  const { occurrences, total, collections } = finds.data;
  if (occurrences.length === 0) return <p className="text-sm text-stone-600">No finds of {taxon}.</p>;
  const oldest = Math.max(...occurrences.map((o) => o.maxMa), range?.fadMa ?? -Infinity);
  const youngest = Math.min(...occurrences.map((o) => o.minMa), range?.ladMa ?? Infinity);
  const span = Math.max(oldest - youngest, 1e-6);
  const x = (age: number) => 8 + ((oldest - age) / span) * (WIDTH - 16);
  const shown = occurrences.slice(0, 200);
  const height = 30 + shown.length * ROW;
  return (
    <section aria-label={`Finds of ${taxon}`} className="space-y-2 rounded-lg border border-stone-200 p-3" data-taxon-occurrences={taxon}>
      <h4 className="font-semibold">
        {taxon}: {pluralize(total, "find")}, {pluralize(collections, "collection")}
      </h4>
      <svg width={WIDTH} height={height} role="img" aria-label={`${taxon}: finds from ${formatMa(oldest)} to ${formatMa(youngest)}, older to the left`} className="max-w-full">
        {range && <rect x={x(range.fadMa)} y={4} width={Math.max(2, x(range.ladMa) - x(range.fadMa))} height={10} rx={3} className="fill-accent-600" />}
        {shown.map((o, i) => (
          <rect key={`${o.uploadId}-${o.row}`} x={x(o.maxMa)} y={22 + i * ROW} width={Math.max(2, x(o.minMa) - x(o.maxMa))} height={ROW - 3} className="fill-stone-500">
            <title>{`Row ${o.row} of ${o.fileName}: ${formatMa(o.maxMa)} to ${formatMa(o.minMa)}${o.collection ? `, collection ${o.collection}` : ""}`}</title>
          </rect>
        ))}
      </svg>
      <p className="text-xs text-stone-600">
        {formatMa(oldest)} (left) to {formatMa(youngest)} (right). {range ? "The upper bar is the range from the finds; " : ""}each lower bar one find's dates.
        {total > shown.length ? ` The first ${shown.length} of ${total} finds are drawn.` : ""}
      </p>
    </section>
  );
}
