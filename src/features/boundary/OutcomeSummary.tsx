import type { BoundaryOutcomeName, OutcomesResult } from "@shared/schemas/outcomes";
import { Card } from "../../components/Card";
import { cx } from "../../lib/cx";
import { formatCount, pluralize } from "../../lib/format";
import { formatMa, formatMyr, windowEdge } from "../../components/timescale/ages";
import { formatPercent, GROUP_ORDER, OUTCOME_GROUP_LABEL } from "./words";

const TILE_TONE: Record<BoundaryOutcomeName, string> = {
  survivor: "border-accent-200 bg-accent-50 text-accent-900",
  victim: "border-red-200 bg-red-50 text-red-900",
  excluded: "border-stone-200 bg-stone-50 text-stone-800",
};

const TILE_NOTE: Record<BoundaryOutcomeName, string> = {
  survivor: "range crosses the boundary",
  victim: "last seen in the window",
  excluded: "not counted in the proportion",
};

/** Where a default window came from: a whole stage, or the part of a stage below a custom age. */
function defaultWindowSource(from: NonNullable<OutcomesResult["windowDefaultFrom"]>): string {
  return from.wholeStage === false ? `down to the base of the ${from.label}, the stage this age falls in` : `the ${from.label}’s duration`;
}

/** Counts of each group and the proportional extinction with its Wilson interval. */
export function OutcomeSummary({ result, refreshing }: { result: OutcomesResult; refreshing: boolean }) {
  const { counts, computedCounts, proportionalExtinction: pe } = result;
  const edge = windowEdge(result.boundary, result.window);
  return (
    <Card
      title="Outcomes across the boundary"
      description={`${pluralize(counts.total, "taxon", "taxa")} at ${formatMa(result.boundary)}, window ${formatMyr(result.window)} (to ${formatMa(edge)})${result.windowDefaultFrom ? `, ${defaultWindowSource(result.windowDefaultFrom)}` : ""}.`}
      actions={refreshing ? <span className="text-sm text-stone-500" role="status">Updating…</span> : undefined}
    >
      <dl className="grid gap-3 sm:grid-cols-3" aria-label="Outcome counts">
        {GROUP_ORDER.map((group) => (
          <div key={group} className={cx("rounded-lg border px-4 py-3", TILE_TONE[group])}>
            <dt className="text-sm font-medium">{OUTCOME_GROUP_LABEL[group]}</dt>
            <dd className="mt-1 text-3xl font-semibold tracking-tight tabular-nums">{formatCount(counts[group])}</dd>
            <dd className="text-sm opacity-80">{TILE_NOTE[group]}</dd>
          </div>
        ))}
      </dl>

      {result.overridesApplied > 0 && (
        <p className="mt-4 rounded-lg border border-stone-200 bg-stone-50 px-4 py-2.5 text-sm text-stone-700">
          <span className="font-semibold text-stone-900">{pluralize(result.overridesApplied, "outcome")} set by hand.</span> From the ranges alone:{" "}
          {pluralize(computedCounts.survivor, "survivor")}, {pluralize(computedCounts.victim, "victim")}, {formatCount(computedCounts.excluded)} not at risk.
        </p>
      )}

      <div className="mt-6">
        <dl>
          <dt className="text-sm font-medium text-stone-600">Proportional extinction</dt>
          <dd className="mt-1" data-testid="proportional-extinction">
            {pe.value === null ? (
              <p className="text-[15px] text-stone-600">Not defined: no taxon is at risk (no survivor and no victim) at this boundary.</p>
            ) : (
              <>
                <p className="text-[15px] text-stone-900">
                  <span className="text-2xl font-semibold tracking-tight tabular-nums">{formatPercent(pe.value)}</span>
                  <span className="ml-2 text-stone-600">
                    {formatCount(pe.victims)} of {pluralize(pe.atRisk, "taxon", "taxa")} at risk
                  </span>
                </p>
                {pe.ci && (
                  <>
                    <IntervalBar value={pe.value} low={pe.ci[0]} high={pe.ci[1]} />
                    <p className="mt-1 text-sm text-stone-600 tabular-nums">
                      {Math.round(pe.level * 100)}% interval {formatPercent(pe.ci[0])} to {formatPercent(pe.ci[1])}. {pe.method}.
                    </p>
                  </>
                )}
              </>
            )}
          </dd>
        </dl>
      </div>
    </Card>
  );
}

/** The proportion and its interval on a 0–100% track. */
function IntervalBar({ value, low, high }: { value: number; low: number; high: number }) {
  const pct = (v: number) => `${Math.min(100, Math.max(0, v * 100))}%`;
  return (
    <div className="mt-3 max-w-xl" aria-hidden="true">
      <div className="relative h-3 rounded-full bg-stone-100">
        <div className="absolute inset-y-0 rounded-full bg-red-200" style={{ left: pct(low), width: `calc(${pct(high)} - ${pct(low)})` }} />
        <div className="absolute -top-1 -bottom-1 w-1 -translate-x-1/2 rounded-full bg-red-700" style={{ left: pct(value) }} />
      </div>
      <div className="mt-1 flex justify-between text-xs text-stone-500 tabular-nums">
        <span>0%</span>
        <span>50%</span>
        <span>100%</span>
      </div>
    </div>
  );
}
