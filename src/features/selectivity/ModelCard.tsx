import { Card } from "../../components/Card";
import { cx } from "../../lib/cx";
import { Notice } from "../../components/Notice";
import { formatCount } from "../../lib/format";
import type { SelectivityResultData } from "./resultRows";
import { Body, ColHead, HeadRow, ResultTable, td, tdNum } from "./ResultTable";
import { formatEstimate, formatInterval, formatP, levelWords } from "./words";

/** Why Firth's bias-reduced fit was used, in words. */
function firthWords(model: NonNullable<SelectivityResultData["model"]>): string {
  if (model.firthReason === "requested") return "Firth’s bias-reduced logistic regression (Firth 1993) was used because the run asked for it.";
  const which = model.separatedPredictors.length ? ` (${model.separatedPredictors.join(", ")})` : "";
  return `Firth’s bias-reduced logistic regression (Firth 1993) was used because the data separate${which}: some trait state has only victims or only survivors, so the ordinary fit drifts to infinite odds ratios. The penalised fit keeps them finite; read them as cautious estimates.`;
}

/** The multiple logistic regression of extinction on the chosen traits. */
export function ModelCard({ result, level }: { result: SelectivityResultData; level: number }) {
  const model = result.model;
  const percent = levelWords(level);
  return (
    <Card
      title="Multiple logistic regression"
      description="Extinction (victim = 1, survivor = 0) on all chosen traits at once: each trait’s odds ratio with the others held fixed."
      className="break-inside-avoid"
    >
      {!model ? (
        <Notice title="No model could be fitted">{result.modelNote ?? "The traits left no taxa with every value known."}</Notice>
      ) : (
        <div className="space-y-5" data-testid="model">
          {model.firth && (
            <div className="rounded-lg border border-caution-200 bg-caution-50 px-4 py-3 text-[15px] text-stone-800" data-testid="firth-note">
              <p className="font-semibold text-caution-700">Bias-reduced fit</p>
              <p className="mt-1">{firthWords(model)}</p>
            </div>
          )}
          <dl className="grid grid-cols-2 gap-x-6 gap-y-3 rounded-lg bg-stone-50 px-4 py-3 sm:grid-cols-3 lg:grid-cols-6">
            <Figure label="Taxa used" value={formatCount(model.n)} />
            <Figure label="Of them victims" value={formatCount(model.victims)} />
            <Figure label="Left out (incomplete)" value={formatCount(model.droppedIncomplete)} />
            <Figure label="Deviance" value={formatEstimate(model.deviance)} />
            <Figure label="Null deviance" value={formatEstimate(model.nullDeviance)} />
            <Figure label="AIC" value={formatEstimate(model.aic)} />
          </dl>
          <p className="text-sm text-stone-600">
            {model.method}
            {!model.converged && " The fit did not converge: treat the estimates as unreliable."}
          </p>

          <ResultTable caption={`Coefficients of the multiple logistic regression with ${percent} intervals`} minWidth="48rem">
            <HeadRow>
              <ColHead>Term</ColHead>
              <ColHead numeric>Estimate</ColHead>
              <ColHead numeric>SE</ColHead>
              <ColHead numeric>Odds ratio</ColHead>
              <ColHead numeric>{percent} interval</ColHead>
              <ColHead numeric>z</ColHead>
              <ColHead numeric>p</ColHead>
            </HeadRow>
            <Body>
              {model.coefficients.map((c) => (
                <tr key={c.name} data-coefficient={c.name} className={c.name === "(Intercept)" ? "text-stone-500" : undefined}>
                  <th scope="row" className={cx(td, "font-medium")}>
                    {c.label}
                  </th>
                  <td className={tdNum}>{formatEstimate(c.estimate)}</td>
                  <td className={tdNum}>{formatEstimate(c.se)}</td>
                  <td className={tdNum}>{c.name === "(Intercept)" ? "—" : formatEstimate(c.oddsRatio)}</td>
                  <td className={tdNum}>{c.name === "(Intercept)" ? "—" : formatInterval(c.oddsRatioCi)}</td>
                  <td className={tdNum}>{formatEstimate(c.z)}</td>
                  <td className={tdNum}>{formatP(c.pValue)}</td>
                </tr>
              ))}
            </Body>
          </ResultTable>

          {model.terms.length > 0 && (
            <ResultTable caption="Likelihood ratio test of each trait: the model with and without all of the trait's terms" minWidth="28rem">
              <HeadRow>
                <ColHead>Trait (likelihood ratio test)</ColHead>
                <ColHead numeric>df</ColHead>
                <ColHead numeric>χ²</ColHead>
                <ColHead numeric>p</ColHead>
              </HeadRow>
              <Body>
                {model.terms.map((t) => (
                  <tr key={t.name} data-term={t.name}>
                    <th scope="row" className={cx(td, "font-medium")}>
                      {t.label}
                    </th>
                    <td className={tdNum}>{t.df}</td>
                    <td className={tdNum}>{formatEstimate(t.chiSquare)}</td>
                    <td className={tdNum}>{formatP(t.pValue)}</td>
                  </tr>
                ))}
              </Body>
            </ResultTable>
          )}

          {model.notes.length > 0 && (
            <ul className="list-disc space-y-1 pl-5 text-sm text-stone-600">
              {model.notes.map((note) => (
                <li key={note}>{note}</li>
              ))}
            </ul>
          )}
        </div>
      )}
    </Card>
  );
}

function Figure({ label, value }: { label: string; value: string }) {
  return (
    <div>
      <dt className="text-xs font-semibold tracking-wide text-stone-500 uppercase">{label}</dt>
      <dd className="text-[15px] font-medium text-stone-900 tabular-nums">{value}</dd>
    </div>
  );
}
