// Does each trait's odds ratio hold once sampling is allowed for? The run's multiple regression
// over the taxa with finds, without and with the sampling covariates, side by side, in words.
import type { RunResults } from "@shared/schemas/runs";
import type { SamplingVerdict } from "@shared/schemas/samplingCheck";
import { Card } from "../../components/Card";
import { Caution } from "../../components/Caution";
import { cx } from "../../lib/cx";
import { formatPStatement, pluralize } from "../../lib/format";
import { Body, ColHead, HeadRow, ResultTable, td, tdNum } from "./ResultTable";
import { formatEstimate, formatInterval } from "./words";

const VERDICT_WORDS: Record<SamplingVerdict, string> = {
  holds: "Holds",
  does_not_hold: "Does not hold",
  no_signal: "No effect to explain",
  not_estimable: "Not estimable",
};
const VERDICT_STYLE: Record<SamplingVerdict, string> = {
  holds: "bg-emerald-50 text-emerald-800 ring-emerald-200",
  does_not_hold: "bg-amber-50 text-amber-900 ring-amber-200",
  no_signal: "bg-stone-100 text-stone-700 ring-stone-200",
  not_estimable: "bg-white text-stone-500 ring-stone-200",
};

type Boundary = RunResults["boundaries"][number];

export function SamplingCard({ boundary, printable = false }: { boundary: Boundary; printable?: boolean }) {
  const sampling = boundary.sampling;
  if (!sampling) return null;
  const title = `Does it hold once sampling is allowed for? ${boundary.label}`;
  return (
    <Card
      title={title}
      description={`The multiple regression over the ${pluralize(sampling.taxa, "victim or survivor", "victims and survivors")} with at least one find, without and with ${sampling.covariates
        .map((c) => (c === "occurrences" ? "the number of occurrences (log scale)" : "the number of collections"))
        .join(" and ")}. ${
        sampling.withoutOccurrences > 0
          ? `${pluralize(sampling.withoutOccurrences, "taxon", "taxa")} without any occurrence ${sampling.withoutOccurrences === 1 ? "is" : "are"} left out of both fits: their sampling is unknown, not zero.`
          : "Every victim and survivor has at least one find."
      }`}
      className="break-inside-avoid"
    >
      <div className="space-y-4" data-testid="sampling-check">
        {sampling.note ? (
          <p className="text-[15px] text-stone-700">{sampling.note}</p>
        ) : (
          <>
            <ResultTable caption={`Odds ratios without and with sampling at ${boundary.label}`} minWidth="44rem">
              <HeadRow>
                <ColHead>Contrast</ColHead>
                <ColHead numeric>Without sampling</ColHead>
                <ColHead numeric>With sampling</ColHead>
                <ColHead>Once sampling is allowed for</ColHead>
              </HeadRow>
              <Body>
                {sampling.contrasts.map((c) => (
                  <tr key={`${c.traitKey}-${c.state ?? ""}`} data-sampling-contrast={`${c.traitKey}:${c.state ?? ""}`}>
                    <th scope="row" className={cx(td, "align-top font-medium")}>
                      {c.contrast}
                    </th>
                    <td className={cx(tdNum, "align-top")}>
                      {c.withoutSampling ? `${formatEstimate(c.withoutSampling.estimate)} (${formatInterval(c.withoutSampling.ci)})` : "—"}
                    </td>
                    <td className={cx(tdNum, "align-top")}>{c.withSampling ? `${formatEstimate(c.withSampling.estimate)} (${formatInterval(c.withSampling.ci)})` : "—"}</td>
                    <td className={cx(td, "align-top")}>
                      <span className={cx("inline-flex items-center rounded-full px-2 py-0.5 text-xs font-semibold ring-1 ring-inset", VERDICT_STYLE[c.verdict])} data-verdict={c.verdict}>
                        {VERDICT_WORDS[c.verdict]}
                      </span>
                      <p className="mt-1 text-xs text-stone-600">{c.words}</p>
                    </td>
                  </tr>
                ))}
              </Body>
            </ResultTable>
            {sampling.covariateTerms.length > 0 && (
              <p className="text-sm text-stone-700">
                Sampling itself:{" "}
                {sampling.covariateTerms
                  .map((t) => `${t.label}, odds ratio ${t.oddsRatio ? `${formatEstimate(t.oddsRatio.estimate)} (${formatInterval(t.oddsRatio.ci)})` : "not estimable"}${t.pValue !== null ? `, ${formatPStatement(t.pValue)}` : ""}`)
                  .join("; ")}
                . Below 1: the more often a taxon was found, the lower its odds of looking extinct.
              </p>
            )}
          </>
        )}
        <Caution title="Reading sampling as a covariate">{sampling.caution}</Caution>
        <p className={cx("text-sm text-stone-500", printable && "text-xs")}>{sampling.method}</p>
      </div>
    </Card>
  );
}
