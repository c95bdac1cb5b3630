import { agesWriter, pluralize } from "../lib/format";
import { useTaxonOccurrences } from "../lib/queries/occurrences";
import { EmptyState } from "./EmptyState";
import { ErrorState } from "./ErrorState";
import { LoadingState } from "./LoadingState";

const WIDTH = 560;
const ROW = 10;
/** Finds drawn and listed; the heading gives the whole count. */
const SHOWN = 200;

/**
 * One taxon's finds on a time axis (older to the left): each find as a bar from its maximum to its minimum age,
 * under the taxon's range, and the same finds as a table (ages, collection, the file row they came from).
 */
export function TaxonFinds({ studyId, taxon, range }: { studyId: string; taxon: string; range: { fadMa: number; ladMa: number } | null }) {
  const finds = useTaxonOccurrences(studyId, taxon);
  if (finds.isPending) return <LoadingState label={`Loading the finds of ${taxon}`} />;
  if (finds.isError) return <ErrorState error={finds.error} title={`The finds of ${taxon} could not be loaded`} onRetry={() => void finds.refetch()} />;
  const { occurrences, total, collections } = finds.data;
  if (occurrences.length === 0) {
    return (
      <EmptyState
        title={`No finds of ${taxon}`}
        description="No occurrence of the study names this taxon. Upload dated finds on the Imports screen; a taxon's finds are those whose taxon is exactly its name."
      />
    );
  }
  const oldest = Math.max(...occurrences.map((o) => o.maxMa), range?.fadMa ?? -Infinity);
  const youngest = Math.min(...occurrences.map((o) => o.minMa), range?.ladMa ?? Infinity);
  const span = Math.max(oldest - youngest, 1e-6);
  const x = (age: number) => 8 + ((oldest - age) / span) * (WIDTH - 16);
  const shown = occurrences.slice(0, SHOWN);
  const height = 30 + shown.length * ROW;
  // The axis, the bars' titles and the table write every age of these finds alike ("94.00" beside "94.41").
  const ages = agesWriter([oldest, youngest, ...shown.flatMap((o) => [o.maxMa, o.minMa])]);
  return (
    <section aria-label={`Finds of ${taxon}`} className="space-y-2 rounded-lg border border-stone-200 p-3" data-taxon-occurrences={taxon}>
      <h4 className="font-semibold">
        {taxon}: {pluralize(total, "find")}, {pluralize(collections, "collection")}
      </h4>
      <svg width={WIDTH} height={height} role="img" aria-label={`${taxon}: finds from ${ages.ma(oldest)} to ${ages.ma(youngest)}, older to the left`} className="max-w-full">
        {range && <rect x={x(range.fadMa)} y={4} width={Math.max(2, x(range.ladMa) - x(range.fadMa))} height={10} rx={3} className="fill-accent-600" />}
        {shown.map((o, i) => (
          <rect key={`${o.uploadId}-${o.row}`} x={x(o.maxMa)} y={22 + i * ROW} width={Math.max(2, x(o.minMa) - x(o.maxMa))} height={ROW - 3} className="fill-stone-500">
            <title>{`Row ${o.row} of ${o.fileName}: ${ages.ma(o.maxMa)} to ${ages.ma(o.minMa)}${o.collection ? `, collection ${o.collection}` : ""}`}</title>
          </rect>
        ))}
      </svg>
      <p className="text-xs text-stone-600">
        {ages.ma(oldest)} (left) to {ages.ma(youngest)} (right). {range ? "The upper bar is the taxon's range; " : ""}each lower bar one find's dates.
        {total > shown.length ? ` The first ${shown.length} of ${total} finds are drawn.` : ""}
      </p>
      <details className="text-sm">
        <summary className="cursor-pointer font-medium">The finds as a table</summary>
        <div className="mt-2 max-h-72 overflow-auto rounded-lg border border-stone-200" tabIndex={0} role="region" aria-label={`Table of the finds of ${taxon}`}>
          <table className="min-w-full text-left">
            <caption className="sr-only">Finds of {taxon}, oldest first</caption>
            <thead className="sticky top-0 bg-stone-50 text-stone-600">
              <tr>
                {["Oldest (Ma)", "Youngest (Ma)", "Intervals", "Collection", "File and row"].map((h) => (
                  <th key={h} scope="col" className="px-3 py-1.5 font-semibold">
                    {h}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody className="divide-y divide-stone-100 tabular-nums">
              {shown.map((o) => (
                <tr key={`${o.uploadId}-${o.row}`}>
                  <td className="px-3 py-1">{ages.number(o.maxMa)}</td>
                  <td className="px-3 py-1">{ages.number(o.minMa)}</td>
                  <td className="px-3 py-1">{[o.earlyInterval, o.lateInterval].filter(Boolean).join(" – ") || "—"}</td>
                  <td className="px-3 py-1">{o.collection || "—"}</td>
                  <td className="px-3 py-1">
                    {o.fileName}, row {o.row}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </details>
    </section>
  );
}
