import { Card } from "../../components/Card";
import { formatMa, windowEdge } from "../../components/timescale/ages";

/** The rules that sort each taxon, written out with this boundary's numbers so a reviewer can check any row by hand. */
export function ClassificationRules({ boundary, window }: { boundary: number; window: number }) {
  const b = formatMa(boundary);
  const edge = formatMa(windowEdge(boundary, window));
  return (
    <Card title="How each taxon is sorted" headingLevel={2}>
      <p className="text-sm text-stone-600">Ages in Ma: a larger number is older. First and last appearances are taken as coded in the trait table.</p>
      <dl className="mt-4 space-y-3 text-[15px]">
        <div>
          <dt className="font-semibold text-stone-900">Survivor</dt>
          <dd className="text-stone-700">
            The range crosses the boundary: first appearance older than {b} and last appearance younger than {b}.
          </dd>
        </div>
        <div>
          <dt className="font-semibold text-stone-900">Victim</dt>
          <dd className="text-stone-700">
            First appearance older than {b}, and last appearance within the window below it: {b} ≤ last appearance ≤ {edge} (boundary ≤ last
            appearance ≤ boundary + window).
          </dd>
        </div>
        <div>
          <dt className="font-semibold text-stone-900">Not at risk</dt>
          <dd className="text-stone-700">
            Everything else: first seen at or after the boundary, last seen before the window (older than {edge}), or a range that is missing or
            unusable. These taxa are left out of the proportional extinction.
          </dd>
        </div>
        <div>
          <dt className="font-semibold text-stone-900">Set by hand</dt>
          <dd className="text-stone-700">
            An outcome set by hand replaces the one computed from the range. One set for this boundary wins over one set for every boundary.
          </dd>
        </div>
      </dl>
    </Card>
  );
}
