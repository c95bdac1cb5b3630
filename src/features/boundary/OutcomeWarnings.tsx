import type { OutcomesResult } from "@shared/schemas/outcomes";
import { Card } from "../../components/Card";
import { cx } from "../../lib/cx";
import { formatCount, pluralize } from "../../lib/format";

type WarningKey = keyof OutcomesResult["warnings"];

const WARNINGS: ReadonlyArray<{ key: WarningKey; title: string }> = [
  { key: "lastSeenBelowBoundary", title: "Last seen below the boundary" },
  { key: "singleInterval", title: "Known from a single stage" },
  { key: "missingRange", title: "Range missing" },
  { key: "invalidRange", title: "Range unusable" },
];

/** Data problems a careful analyst checks before trusting the counts, each with the number of taxa it touches. */
export function OutcomeWarnings({ warnings }: { warnings: OutcomesResult["warnings"] }) {
  const touched = WARNINGS.filter((w) => warnings[w.key].count > 0).length;
  return (
    <Card
      title="Check before relying on the counts"
      description={touched === 0 ? "None of these problems touches a taxon at this boundary." : `${pluralize(touched, "warning")} of four touch taxa at this boundary.`}
    >
      <ul className="-my-3 divide-y divide-stone-100">
        {WARNINGS.map(({ key, title }) => {
          const warning = warnings[key];
          const active = warning.count > 0;
          return (
            <li key={key} className="py-3" data-warning={key}>
              <div className="flex items-baseline justify-between gap-4">
                <p className={cx("font-semibold", active ? "text-caution-700" : "text-stone-500")}>{title}</p>
                <p className={cx("shrink-0 text-sm tabular-nums", active ? "font-semibold text-caution-700" : "text-stone-500")}>
                  {active ? `touches ${pluralize(warning.count, "taxon", "taxa")}` : "none"}
                </p>
              </div>
              <p className={cx("mt-1 text-sm", active ? "text-stone-700" : "text-stone-500")}>{warning.note}</p>
              {active && (
                <details className="mt-2 text-sm">
                  <summary className="cursor-pointer font-medium text-accent-700 hover:text-accent-900">
                    {warning.sample.length < warning.count ? `Show the first ${formatCount(warning.sample.length)} by name` : "Show them"}
                  </summary>
                  <p className="mt-1 text-stone-700">{warning.sample.join(", ")}</p>
                </details>
              )}
            </li>
          );
        })}
      </ul>
    </Card>
  );
}
