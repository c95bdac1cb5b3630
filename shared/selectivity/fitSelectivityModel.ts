import { buildDesignMatrix, logisticRegression, type DesignMatrix, type DesignVariable, type LogisticRegressionResult } from "../stats";
import { chiSquareUpperTail } from "../stats/distributions";
import { choleskyDecompose, choleskySolve } from "../stats/linalg";
import type { EncodedTrait } from "./encodeTrait";
import { numericPredictorLabel, type NumericScaling } from "./scaleNumericTrait";
import { plainMessage } from "./testNumericTrait";
import type { Interval, ModelEncoding, ModelResult, SelectivityTraitSpec } from "./types";

/** A trait offered to the multiple regression, as the per-trait analysis prepared it. */
export interface ModelTraitInput {
  spec: SelectivityTraitSpec;
  encoded: EncodedTrait;
  /** Traits with states: index of the reference state in spec.states (-1 when none has taxa). */
  reference: number;
  /** Numeric traits: the scaling the trait's own test used. */
  scaling: NumericScaling | null;
  /** Why the trait's own test was not possible (then it stays out of the model), or null. */
  untestable: string | null;
}

export interface SelectivityModelFit {
  model: ModelResult | null;
  /** Why no model could be fitted. */
  modelNote: string | null;
  /** Taxa with a usable value of every trait that entered (or was meant to enter) the model. */
  completeCases: number;
  /** Odds ratio adjusted for the other traits: by trait key and state code ("" for numeric traits). */
  adjusted: Map<string, Map<string, Interval>>;
  /** Why a trait, or a state of it, has no model-adjusted odds ratio: by trait key. */
  missingReasons: Map<string, string>;
  /** The design and outcomes of the fit (complete cases), for the confounding judgement; absent without a model. */
  design?: DesignMatrix;
  y?: number[];
}

/**
 * The multiple logistic regression of extinction on the chosen traits, over complete cases (taxa
 * with a usable value of every trait in the model; the others are counted as dropped). Traits with
 * states are dummy coded against their reference state (the one their own table uses, when it has
 * taxa among the complete cases), numeric traits enter with the scaling of their own test. A trait
 * whose own test was impossible, or that has a single state or value among the complete cases,
 * stays out, with a note. The fit is by iteratively reweighted least squares; when the data
 * separate, or when `forceFirth` is set, it is Firth's bias-reduced regression (Firth 1993), and a
 * note says so and names what separates. Each trait is tested as a whole by (penalized) likelihood
 * ratio. The encoding and covariance are kept so new taxa can be scored (see scoreWithModel).
 *
 * @example
 * fitSelectivityModel(traits [life habit, body size], outcomes, { forceFirth: false, level: 0.95 })
 * // => { model: { n: 412, coefficients: [(Intercept), life_habit=infaunal, body_size], terms: [...], aic: 498.3, firth: false, ... },
 * //      completeCases: 412, adjusted: Map { life_habit => { infaunal => { estimate: 1.08, ci: [...] } }, body_size => ... } }
 */
export function fitSelectivityModel(traits: ModelTraitInput[], outcome: Uint8Array, opts: { forceFirth: boolean; level: number }): SelectivityModelFit {
  const n = outcome.length;
  const notes: string[] = [];
  const missingReasons = new Map<string, string>();
  const adjusted = new Map<string, Map<string, Interval>>();
  let members = traits.filter((trait) => {
    if (trait.untestable === null) return true;
    missingReasons.set(trait.spec.key, `${trait.spec.label} is not in the multiple regression: its own test was not possible.`);
    return false;
  });
  for (const trait of traits) {
    if (trait.untestable !== null) notes.push(`${trait.spec.label} is left out of the model: its own test was not possible.`);
  }

  // Complete cases; a trait with a single state or value among them cannot be estimated, and
  // removing it enlarges the complete cases, so repeat until nothing changes.
  let complete: Uint8Array = new Uint8Array(n);
  let completeCases = 0;
  for (;;) {
    complete = completeRows(members, n);
    completeCases = 0;
    for (let i = 0; i < n; i++) completeCases += complete[i];
    if (completeCases === 0) break;
    const dropped = members.find((trait) => !variesAmong(trait, complete));
    if (!dropped) break;
    members = members.filter((trait) => trait !== dropped);
    const why = `${dropped.spec.label} is left out of the model: among the taxa with every chosen trait known it has a single ${dropped.spec.kind === "numeric" ? "value" : "state"}.`;
    notes.push(why);
    missingReasons.set(dropped.spec.key, why);
  }
  const noModel = (modelNote: string): SelectivityModelFit => ({ model: null, modelNote, completeCases, adjusted, missingReasons });
  if (traits.length === 0) return noModel("No traits were chosen, so there is no multiple regression.");
  if (members.length === 0) return noModel(`No trait can enter the multiple regression. ${notes.join(" ")}`.trim());
  if (completeCases === 0) return noModel("No taxon has a usable value of every chosen trait, so the multiple regression has no data.");

  const y = new Array<number>(completeCases);
  let victims = 0;
  for (let i = 0, k = 0; i < n; i++) {
    if (!complete[i]) continue;
    y[k++] = outcome[i];
    victims += outcome[i];
  }
  if (victims === 0 || victims === completeCases) {
    return noModel(`All ${completeCases} taxa with every chosen trait known ${victims === 0 ? "survived" : "died out"}; a regression needs both victims and survivors.`);
  }

  const variables: DesignVariable[] = [];
  const referenceCodes = new Map<string, string>();
  for (const trait of members) variables.push(designVariable(trait, complete, completeCases, notes, referenceCodes));
  let design: DesignMatrix;
  let fit: LogisticRegressionResult;
  try {
    design = buildDesignMatrix(variables);
    fit = logisticRegression(design, y, {
      names: design.names,
      firth: opts.forceFirth ? true : undefined,
      level: opts.level,
      terms: design.terms,
    });
  } catch (error) {
    return noModel(`The multiple logistic regression could not be fitted: ${plainMessage(error)}.`);
  }

  const encoding = modelEncoding(members, design, referenceCodes);
  const labels = columnLabels(members, design, referenceCodes);
  const finite = (v: number): boolean => Number.isFinite(v);
  const allFinite = (): boolean =>
    fit.coefficients.every((c) => [c.estimate, c.se, c.z, c.pValue, c.ci[0], c.ci[1], c.oddsRatio, c.oddsRatioCi[0], c.oddsRatioCi[1]].every(finite)) &&
    fit.covariance.every((row) => row.every(finite)) &&
    [fit.deviance, fit.nullDeviance, fit.aic].every(finite) &&
    (fit.terms ?? []).every((t) => finite(t.chiSquare) && finite(t.pValue));
  if (!fit.converged) {
    return noModel(`The multiple logistic regression did not converge in ${fit.iterations} iterations: interval not reported.`);
  }
  if (fit.profileConverged === false) {
    // Profile intervals rest on refits that did not converge: not reported; the Firth fit's Wald intervals are shown instead, said in a note.
    try {
      fit = logisticRegression(design, y, { names: design.names, firth: true, firthIntervals: "wald", level: opts.level });
    } catch (error) {
      return noModel(`The multiple logistic regression could not be fitted: ${plainMessage(error)}.`);
    }
    fit.terms = (design.terms ?? []).map((term) => waldTermTest(fit, term));
    notes.push(
      "The profile penalized likelihood refits did not converge: profile intervals and penalized likelihood ratio tests not reported; the intervals shown are Wald intervals of Firth's fit and each trait is tested by a Wald test.",
    );
  }
  if (!allFinite()) {
    return noModel(
      "The multiple logistic regression gave estimates or intervals that are not finite numbers: the data carry too little information for this many terms; choose fewer traits.",
    );
  }

  if (fit.firth) notes.unshift(firthNote(fit, design, y, labels));
  const dropped = n - completeCases;
  if (dropped > 0) notes.push(`${dropped} taxa lack a usable value of at least one chosen trait and are left out (complete cases only).`);

  // Model-adjusted odds ratios, comparable with a trait's crude ones only against the same reference.
  for (const trait of members) {
    const key = trait.spec.key;
    const byState = new Map<string, Interval>();
    adjusted.set(key, byState);
    if (trait.spec.kind === "numeric") {
      const j = design.names.indexOf(key) + 1;
      byState.set("", interval(fit, j));
      continue;
    }
    const ownReference = trait.spec.states[trait.reference]?.code;
    if (referenceCodes.get(key) !== ownReference) {
      missingReasons.set(key, `The model compares ${trait.spec.label} against another reference state (the table's has no taxa among the complete cases), so its odds ratios are not shown beside the crude ones.`);
      continue;
    }
    design.names.forEach((_name, column) => {
      if (encoding.columns[column].trait === key && encoding.columns[column].kind === "state") {
        byState.set((encoding.columns[column] as { state: string }).state, interval(fit, column + 1));
      }
    });
  }

  const model: ModelResult = {
    n: completeCases,
    victims,
    droppedIncomplete: dropped,
    method: modelMethod(fit),
    coefficients: fit.coefficients.map((c, j) => ({
      name: c.name,
      estimate: c.estimate,
      se: c.se,
      z: c.z,
      pValue: c.pValue,
      ci: [c.ci[0], c.ci[1]],
      oddsRatio: c.oddsRatio,
      oddsRatioCi: [c.oddsRatioCi[0], c.oddsRatioCi[1]],
      label: j === 0 ? "(Intercept)" : labels[j - 1],
    })),
    terms: (fit.terms ?? []).map((t) => ({
      name: t.name,
      label: members.find((trait) => trait.spec.key === t.name)?.spec.label ?? t.name,
      df: t.df,
      chiSquare: t.chiSquare,
      pValue: t.pValue,
    })),
    deviance: fit.deviance,
    nullDeviance: fit.nullDeviance,
    aic: fit.aic,
    converged: fit.converged,
    firth: fit.firth,
    firthReason: fit.firthReason ?? null,
    separatedPredictors: fit.separatedPredictors,
    encoding,
    covariance: fit.covariance.map((row) => [...row]),
    notes,
  };
  return { model, modelNote: null, completeCases, adjusted, missingReasons, design, y };
}

function completeRows(members: ModelTraitInput[], n: number): Uint8Array {
  const complete = new Uint8Array(n).fill(1);
  for (const trait of members) {
    const encoded = trait.encoded;
    if (encoded.kind === "states") {
      const codes = encoded.codes;
      for (let i = 0; i < n; i++) if (codes[i] < 0) complete[i] = 0;
    } else {
      const values = encoded.transformed;
      for (let i = 0; i < n; i++) if (Number.isNaN(values[i])) complete[i] = 0;
    }
  }
  return complete;
}

function variesAmong(trait: ModelTraitInput, complete: Uint8Array): boolean {
  const encoded = trait.encoded;
  if (encoded.kind === "states") {
    let first = -1;
    for (let i = 0; i < complete.length; i++) {
      if (!complete[i]) continue;
      if (first < 0) first = encoded.codes[i];
      else if (encoded.codes[i] !== first) return true;
    }
    return false;
  }
  let first = NaN;
  for (let i = 0; i < complete.length; i++) {
    if (!complete[i]) continue;
    if (Number.isNaN(first)) first = encoded.transformed[i];
    else if (encoded.transformed[i] !== first) return true;
  }
  return false;
}

/** The design variable of one trait over the complete cases; picks the reference the model uses. */
function designVariable(
  trait: ModelTraitInput,
  complete: Uint8Array,
  completeCases: number,
  notes: string[],
  referenceCodes: Map<string, string>,
): DesignVariable {
  const { spec, encoded } = trait;
  if (encoded.kind === "numeric") {
    const scaling = trait.scaling ?? { center: 0, scale: 1 };
    const values = new Array<number>(completeCases);
    for (let i = 0, k = 0; i < complete.length; i++) if (complete[i]) values[k++] = (encoded.transformed[i] - scaling.center) / scaling.scale;
    return { name: spec.key, kind: "numeric", values };
  }
  const counts = new Int32Array(spec.states.length);
  const values = new Array<string>(completeCases);
  for (let i = 0, k = 0; i < complete.length; i++) {
    if (!complete[i]) continue;
    counts[encoded.codes[i]]++;
    values[k++] = spec.states[encoded.codes[i]].code;
  }
  const levels = spec.states.filter((_, s) => counts[s] > 0).map((state) => state.code);
  let reference = trait.reference >= 0 && counts[trait.reference] > 0 ? trait.reference : -1;
  if (reference < 0) {
    for (let s = 0; s < counts.length; s++) if (reference < 0 || counts[s] > counts[reference]) reference = s;
    notes.push(
      `${spec.label}: the reference state of its table has no taxa among the complete cases, so the model compares against ${spec.states[reference].label}.`,
    );
  }
  referenceCodes.set(spec.key, spec.states[reference].code);
  return { name: spec.key, kind: "categorical", values, levels, reference: spec.states[reference].code };
}

function modelEncoding(members: ModelTraitInput[], design: DesignMatrix, referenceCodes: Map<string, string>): ModelEncoding {
  const traits: ModelEncoding["traits"] = members.map((trait) => {
    const { spec } = trait;
    if (spec.kind === "numeric") {
      const scaling = trait.scaling ?? { center: 0, scale: 1 };
      return { key: spec.key, label: spec.label, kind: "numeric", transform: spec.transform, center: scaling.center, scale: scaling.scale };
    }
    const levels = design.encodings.find((e) => e.name === spec.key);
    const states = levels && levels.kind === "categorical" ? levels.levels : [];
    return { key: spec.key, label: spec.label, kind: "states", reference: referenceCodes.get(spec.key) ?? "", states };
  });
  const columns: ModelEncoding["columns"] = [];
  for (const enc of design.encodings) {
    const trait = members.find((t) => t.spec.key === enc.name);
    if (!trait) continue;
    if (enc.kind === "numeric") {
      const scaling = trait.scaling ?? { center: 0, scale: 1 };
      columns[enc.column] = { name: design.names[enc.column], trait: enc.name, kind: "numeric", transform: trait.spec.transform, center: scaling.center, scale: scaling.scale };
    } else {
      const nonReference = enc.levels.filter((level) => level !== enc.reference);
      enc.columns.forEach((column, c) => {
        columns[column] = { name: design.names[column], trait: enc.name, kind: "state", state: nonReference[c] };
      });
    }
  }
  return { traits, columns };
}

function columnLabels(members: ModelTraitInput[], design: DesignMatrix, referenceCodes: Map<string, string>): string[] {
  const labels = new Array<string>(design.columns);
  for (const enc of design.encodings) {
    const trait = members.find((t) => t.spec.key === enc.name);
    if (!trait) continue;
    const { spec } = trait;
    if (enc.kind === "numeric") {
      labels[enc.column] = numericPredictorLabel(spec);
      continue;
    }
    const stateLabel = (code: string): string => spec.states.find((s) => s.code === code)?.label ?? code;
    const reference = stateLabel(referenceCodes.get(spec.key) ?? enc.reference);
    const nonReference = enc.levels.filter((level) => level !== enc.reference);
    enc.columns.forEach((column, c) => {
      labels[column] = `${spec.label}: ${stateLabel(nonReference[c])} (vs ${reference})`;
    });
  }
  return labels;
}

function interval(fit: LogisticRegressionResult, j: number): Interval {
  const c = fit.coefficients[j];
  return { estimate: c.oddsRatio, ci: [c.oddsRatioCi[0], c.oddsRatioCi[1]] };
}

/** Wald test of a term's coefficients together: b' V^-1 b on as many degrees of freedom as columns (Wald 1943). */
function waldTermTest(fit: LogisticRegressionResult, term: { name: string; columns: number[] }): NonNullable<LogisticRegressionResult["terms"]>[number] {
  const k = term.columns.length;
  const index = term.columns.map((c) => c + 1);
  const v = new Float64Array(k * k);
  index.forEach((a, r) => index.forEach((b, c) => (v[r * k + c] = fit.covariance[a][b])));
  const estimate = index.map((j) => fit.coefficients[j].estimate);
  const lower = new Float64Array(k * k);
  if (choleskyDecompose(v, k, lower) >= 0) return { name: term.name, columns: term.columns, df: k, chiSquare: NaN, pValue: NaN };
  const solved = choleskySolve(lower, k, estimate, new Float64Array(k));
  const chiSquare = estimate.reduce((sum, b, r) => sum + b * solved[r], 0);
  return { name: term.name, columns: term.columns, df: k, chiSquare, pValue: chiSquareUpperTail(chiSquare, k) };
}

function modelMethod(fit: LogisticRegressionResult): string {
  if (!fit.firth) {
    return "Multiple logistic regression by iteratively reweighted least squares; Wald intervals and z tests per coefficient; likelihood ratio test per trait. Deviance and AIC as for any binomial generalised linear model.";
  }
  const intervals = fit.ciMethod === "profile" ? "profile penalized likelihood intervals and penalized likelihood ratio tests per coefficient" : "Wald intervals and z tests per coefficient";
  const termTests = fit.ciMethod === "profile" ? "penalized likelihood ratio test per trait (Heinze & Schemper 2002)" : "Wald test per trait";
  return `Firth's bias-reduced multiple logistic regression (Firth 1993); ${intervals}; ${termTests}. Deviance and AIC are those of the ordinary fit.`;
}

/** Says that Firth's regression was used and why, naming in plain words what separates the outcomes. */
function firthNote(fit: LogisticRegressionResult, design: DesignMatrix, y: number[], labels: string[]): string {
  if (fit.firthReason === "requested") {
    return "Firth's bias-reduced logistic regression (Firth 1993) was used, as requested in the options.";
  }
  const described = fit.separatedPredictors.map((name) => {
    const column = design.names.indexOf(name);
    if (column < 0) return name;
    const label = labels[column];
    let count = 0;
    let events = 0;
    let binary = true;
    for (let i = 0; i < design.rows; i++) {
      const v = design.data[i * design.columns + column];
      if (v !== 0 && v !== 1) binary = false;
      if (v === 1) {
        count++;
        events += y[i];
      }
    }
    if (binary && count > 0 && (events === 0 || events === count)) {
      return `all ${count} taxa with ${label.replace(/ \(vs .*\)$/, "")} ${events === 0 ? "survived" : "died out"}`;
    }
    return `${label} separates victims from survivors`;
  });
  const what = described.length > 0 ? `: ${described.join("; ")}` : "";
  const found =
    fit.separationMethod === "linear-programme"
      ? ` (${fit.separationKind === "complete" ? "complete" : "quasi-complete"} separation, found before fitting by linear programming; Konis 2007)`
      : " (found as the ordinary fit ran off along a separating direction)";
  return `Firth's bias-reduced logistic regression (Firth 1993) was used because the data separate the outcomes${what}${found}. An ordinary fit would give an infinite odds ratio there; Firth's stays finite but remains uncertain.`;
}
