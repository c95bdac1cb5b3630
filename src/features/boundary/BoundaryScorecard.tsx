import type { ScorecardItemResult, TurnoverResult } from "@shared/schemas/turnover";
import { Card } from "../../components/Card";
import { textLinkClasses } from "../../components/TextLink";
import { Caution } from "../../components/Caution";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { cx } from "../../lib/cx";
import { formatCount } from "../../lib/format";
import type { useTurnover } from "./api";
import { formatPercent, formatWholePercent } from "./words";

const STATUS_TONE: Record<ScorecardItemResult["status"], string> = {
  meets: "border-red-200 bg-red-50 text-red-900",
  "falls short": "border-accent-200 bg-accent-50 text-accent-900",
  uncertain: "border-caution-200 bg-caution-50 text-caution-700",
  reported: "border-stone-200 bg-stone-50 text-stone-800",
  "not assessable": "border-dashed border-stone-300 bg-white text-stone-600",
};

const STATUS_WORDS: Record<ScorecardItemResult["status"], string> = {
  meets: "Meets",
  "falls short": "Falls short",
  uncertain: "Uncertain",
  reported: "Reported",
  "not assessable": "Not assessable from this study",
};

const CRITERION_QUESTION: Record<ScorecardItemResult["criterion"], string> = {
  magnitude: "How much was lost?",
  breadth: "Were many groups hit?",
  realms: "Were several realms hit?",
  geography: "Were losses spread across regions?",
  brevity: "How short was it?",
  standingOut: "Does it stand out from background?",
};

/** The boundary scorecard: the criteria the trade reads for a mass extinction, each from this study's data or marked not assessable. */
export function BoundaryScorecard({ turnover, csvUrl }: { turnover: ReturnType<typeof useTurnover>; csvUrl: string | null }) {
  const data = turnover.data;
  return (
    <Card
      title="Boundary scorecard"
      description="The criteria by which an event is usually called a mass extinction, each read from this study’s taxa where it can be."
      actions={
        <>
          {turnover.isFetching && data && (
            <span className="text-sm text-stone-500" role="status">
              Updating…
            </span>
          )}
          {csvUrl && data && (
            <a className={cx(textLinkClasses, "text-sm")} href={csvUrl} download>
              Download the scorecard (CSV)
            </a>
          )}
        </>
      }
    >
      <div data-testid="scorecard">
        {turnover.isPending && <LoadingState label="Reading the criteria" lines={3} />}
        {turnover.isError && <ErrorState error={turnover.error} title="The scorecard could not be worked out" onRetry={() => void turnover.refetch()} />}
        {data && <ScorecardBody scorecard={data.scorecard} />}
      </div>
    </Card>
  );
}

function ScorecardBody({ scorecard }: { scorecard: TurnoverResult["scorecard"] }) {
  return (
    <>
      <ul className="grid gap-3 md:grid-cols-2 xl:grid-cols-3">
        {scorecard.items.map((item) => (
          <li key={item.criterion} className={cx("rounded-lg border px-4 py-3", STATUS_TONE[item.status])} data-testid={`scorecard-${item.criterion}`} data-status={item.status}>
            <p className="flex items-baseline justify-between gap-2">
              <span className="text-sm font-semibold">{item.label}</span>
              <span className="text-xs font-medium tracking-wide uppercase">{STATUS_WORDS[item.status]}</span>
            </p>
            <p className="mt-0.5 text-xs opacity-80">{CRITERION_QUESTION[item.criterion]}</p>
            <p className="mt-2 text-sm text-stone-800">{item.summary}</p>
            {item.dimensions.some((d) => d.groups.length > 0) && item.status !== "not assessable" && (
              <details className="mt-2">
                <summary className="cursor-pointer text-xs font-medium text-accent-700 hover:text-accent-900">Groups read</summary>
                {item.dimensions.map((d) => (
                  <table key={d.key} className="mt-2 w-full text-xs">
                    <caption className="text-left font-medium text-stone-700">{d.label}</caption>
                    <tbody className="divide-y divide-stone-100">
                      {d.groups.map((g) => (
                        <tr key={g.name}>
                          <th scope="row" className="py-0.5 pr-2 text-left font-normal text-stone-800">
                            {g.name}
                          </th>
                          <td className="py-0.5 text-right tabular-nums text-stone-700">
                            {formatCount(g.victims)} of {formatCount(g.atRisk)}
                          </td>
                          <td className="py-0.5 pl-2 text-right tabular-nums text-stone-700">{g.proportion === null ? "—" : formatPercent(g.proportion)}</td>
                          <td className="py-0.5 pl-2 text-right text-stone-500">{g.over === null ? "too few" : g.over ? "hit" : "spared"}</td>
                        </tr>
                      ))}
                    </tbody>
                  </table>
                ))}
              </details>
            )}
          </li>
        ))}
      </ul>
      <div className="mt-4 space-y-3">
        <Caution title="One study is not a global verdict">{scorecard.caution}</Caution>
        <p className="text-sm text-stone-600">
          {scorecard.source} A group counts as hit when it lost more than {formatWholePercent(scorecard.breadthShare)} of its taxa at risk, and is read
          only with at least {scorecard.minGroupAtRisk} taxa at risk. Magnitude compares the loss with the ~{formatWholePercent(scorecard.threshold)}{" "}
          convention using its {Math.round(scorecard.level * 100)}% Wilson interval.
        </p>
      </div>
    </>
  );
}
