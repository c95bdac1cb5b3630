import type { ReactNode } from "react";
import { Card } from "../../components/Card";
import { cx } from "../../lib/cx";
import { Notice } from "../../components/Notice";
import { formatCount, pluralize } from "../../lib/format";
import type { SelectivityResultData } from "./resultRows";
import { Body, ColHead, HeadRow, ResultTable, td, tdNum, th, thNum } from "./ResultTable";
import { formatEstimate, formatInterval, formatP, levelWords } from "./words";

/** Why Firth's bias-reduced fit was used, in words. */
function firthWords(model: NonNullable<SelectivityResultData["model"]>): string {
  if (model.firthReason === "requested") return "Firth’s bias-reduced logistic regression (Firth 1993) was used because the run asked for it.";
  const which = model.separatedPredictors.length ? ` (${model.separatedPredictors.join(", ")})` : "";
  return `Firth’s bias-reduced logistic regression (Firth 1993) was used because the data separate${which}: some trait state has only victims or only survivors, so the ordinary fit drifts to infinite odds ratios. The penalised fit keeps them finite; read them as cautious estimates.`;
}

/**
 * The run's own note on the separation (it names the separating state in words and how the separation
 * was found: the linear programme before fitting, Konis 2007, or the fit running off), shown in the
 * Firth box instead of repeated in the list of notes. Runs saved without it keep the generic words.
 */
function separationNoteOf(model: SelectivityResultData["model"]): string | undefined {
  if (!model?.firth || model.firthReason !== "separation") return undefined;
  return model.notes.find((note) => note.startsWith("Firth's bias-reduced logistic regression (Firth 1993) was used because the data separate"));
}

/** The multiple logistic regression of extinction on the chosen traits. */
export function ModelCard({ result, level }: { result: SelectivityResultData; level: number }) {
  const model = result.model;
  const percent = levelWords(level);
  const separationNote = separationNoteOf(model);
  const otherNotes = model ? model.notes.filter((note) => note !== separationNote) : [];
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
              <p className="mt-1">{separationNote ?? firthWords(model)}</p>
            </div>
          )}
          <ModelFit model={model} />
          <p className="text-sm text-stone-600">
            {model.method}
            {!model.converged && " The fit did not converge: treat the estimates as unreliable."}
          </p>

          <ResultTable caption={`Each term of the model: its odds ratio with ${percent} interval and p, and the same on the log-odds scale`} minWidth="50rem">
            <thead className="border-b border-stone-200 bg-stone-50">
              <tr>
                <th scope="col" rowSpan={2} className={cx(th, "align-bottom")}>
                  Term
                </th>
                <th scope="colgroup" colSpan={3} className={cx(th, "border-b border-stone-200 pb-1 text-center")}>
                  What the term does to the odds of extinction
                </th>
                <th scope="colgroup" colSpan={3} className={cx(th, "border-b border-l border-stone-200 pb-1 text-center")}>
                  On the log-odds scale
                </th>
              </tr>
              <tr>
                <th scope="col" className={thNum}>Odds ratio</th>
                <th scope="col" className={thNum}>{percent} interval</th>
                <th scope="col" className={thNum}>p</th>
                <th scope="col" className={cx(thNum, "border-l border-stone-200")}>
                  Coefficient<span className="block font-normal normal-case">log odds ratio</span>
                </th>
                <th scope="col" className={thNum}>
                  Uncertainty<span className="block font-normal normal-case">standard error</span>
                </th>
                <th scope="col" className={thNum}>
                  Ratio<span className="block font-normal normal-case">Wald z, coefficient ÷ SE</span>
                </th>
              </tr>
            </thead>
            <Body>
              {model.coefficients.map((c) => {
                const baseline = c.name === "(Intercept)";
                return (
                  <tr key={c.name} data-coefficient={c.name} className={baseline ? "text-stone-500" : undefined}>
                    <th scope="row" className={cx(td, "font-medium")}>
                      {baseline ? (
                        <>
                          Baseline<span className="block text-xs font-normal">odds of a taxon with every reference state (intercept)</span>
                        </>
                      ) : (
                        c.label
                      )}
                    </th>
                    <td className={tdNum}>{baseline ? "—" : formatEstimate(c.oddsRatio)}</td>
                    <td className={tdNum}>{baseline ? "—" : formatInterval(c.oddsRatioCi)}</td>
                    <td className={tdNum}>{formatP(c.pValue)}</td>
                    <td className={cx(tdNum, "border-l border-stone-100")}>{formatEstimate(c.estimate)}</td>
                    <td className={tdNum}>{formatEstimate(c.se)}</td>
                    <td className={tdNum}>{formatEstimate(c.z)}</td>
                  </tr>
                );
              })}
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

          {otherNotes.length > 0 && (
            <ul className="list-disc space-y-1 pl-5 text-sm text-stone-600">
              {otherNotes.map((note) => (
                <li key={note}>{note}</li>
              ))}
            </ul>
          )}
        </div>
      )}
    </Card>
  );
}

/**
 * How well the model fits, in plain words with the technical name beside each figure: how many
 * taxa it rests on, how much misfit is left with and without the traits, and the information
 * criterion that weighs fit against the number of terms.
 */
function ModelFit({ model }: { model: NonNullable<SelectivityResultData["model"]> }) {
  const terms = model.coefficients.filter((c) => c.name !== "(Intercept)").length;
  const explained = model.nullDeviance - model.deviance;
  return (
    <section aria-label="Model fit" className="rounded-lg border border-stone-200 px-4 py-3" data-testid="model-fit">
      <p className="text-sm font-semibold text-stone-800">Model fit</p>
      <dl className="mt-2 grid gap-x-8 gap-y-3 sm:grid-cols-2 lg:grid-cols-4">
        <FitItem label="Taxa in the model" value={formatCount(model.n)}>
          {pluralize(model.victims, "victim")}, {pluralize(model.n - model.victims, "survivor")}
          {model.droppedIncomplete > 0 && `; ${formatCount(model.droppedIncomplete)} left out for a missing value`}
        </FitItem>
        <FitItem label="Misfit with no traits" value={formatEstimate(model.nullDeviance)}>
          null deviance
        </FitItem>
        <FitItem label="Misfit left with the traits" value={formatEstimate(model.deviance)}>
          residual deviance; the traits take away {formatEstimate(explained)} with {pluralize(terms, "term")}
        </FitItem>
        <FitItem label="Fit weighed against size" value={formatEstimate(model.aic)}>
          Akaike information criterion (AIC); lower is better between models of the same taxa
        </FitItem>
      </dl>
    </section>
  );
}

function FitItem({ label, value, children }: { label: string; value: string; children: ReactNode }) {
  return (
    <div className="min-w-0">
      <dt className="text-sm text-stone-600">{label}</dt>
      <dd className="text-lg font-semibold text-stone-900 tabular-nums">{value}</dd>
      <dd className="text-xs text-stone-500">{children}</dd>
    </div>
  );
}
