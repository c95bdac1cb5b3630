import { twoSidedCriticalValue } from "../stats/distributions";
import type { ModelResult } from "./types";

/** A predicted extinction probability, or the reason none can be given. */
export type ModelScore =
  | { probability: number; ci: [number, number]; linearPredictor: number; se: number; reason: null }
  | { probability: null; ci: null; linearPredictor: null; se: null; reason: string };

/**
 * Scores a new taxon (e.g. a modern species) with a fitted selectivity model: the predicted
 * probability of extinction is the logistic function of the linear predictor eta = x'b, where x
 * codes the taxon's trait values as the model did (a 1 in the column of its state, none for the
 * reference state; numbers transformed, centred and scaled). The interval is the Wald interval of
 * eta, eta +- z sqrt(x' V x) with V the coefficients' covariance, mapped through the logistic
 * function, so it stays inside (0, 1). A missing value, a state the model has no estimate for, or a
 * number it cannot transform gives no score and a reason.
 *
 * @example
 * scoreWithModel(model with (Intercept) -1.2 and life_habit=infaunal 0.9, { life_habit: "infaunal" })
 * // => { probability: 0.4256 (= 1 / (1 + e^0.3)), ci: [...], linearPredictor: -0.3, se: ..., reason: null }
 */
export function scoreWithModel(model: ModelResult, values: Record<string, string | number | null>, level = 0.95): ModelScore {
  if (!(typeof level === "number" && level > 0 && level < 1)) throw new Error(`scoreWithModel: level is ${String(level)}; it must lie strictly between 0 and 1`);
  const p = model.coefficients.length;
  const x = new Float64Array(p);
  x[0] = 1;
  const fail = (reason: string): ModelScore => ({ probability: null, ci: null, linearPredictor: null, se: null, reason });
  const columns = model.encoding.columns;
  for (const trait of model.encoding.traits) {
    const value = values[trait.key];
    if (value === null || value === undefined || (typeof value === "string" && value.trim() === "")) {
      return fail(`No value of ${trait.label}; the model needs every one of its traits.`);
    }
    if (trait.kind === "states") {
      const code = typeof value === "string" ? value.trim() : String(value);
      if (code === trait.reference) continue;
      const column = columns.findIndex((c) => c.kind === "state" && c.trait === trait.key && c.state === code);
      if (column < 0) {
        return fail(`"${code}" is not a state the model has an estimate for in ${trait.label} (it knows ${trait.states.join(", ")}).`);
      }
      x[column + 1] = 1;
      continue;
    }
    const number = typeof value === "number" ? value : Number(value.trim());
    if (!Number.isFinite(number)) return fail(`The value of ${trait.label}, "${String(value)}", is not a number.`);
    if (trait.transform === "log10" && number <= 0) return fail(`The value of ${trait.label}, ${number}, is zero or below, where log10 is undefined.`);
    const column = columns.findIndex((c) => c.kind === "numeric" && c.trait === trait.key);
    if (column < 0) return fail(`The model has no column for ${trait.label}.`);
    const transformed = trait.transform === "log10" ? Math.log10(number) : number;
    x[column + 1] = (transformed - trait.center) / trait.scale;
  }

  let eta = 0;
  for (let j = 0; j < p; j++) eta += x[j] * model.coefficients[j].estimate;
  let variance = 0;
  for (let a = 0; a < p; a++) {
    if (x[a] === 0) continue;
    for (let b = 0; b < p; b++) variance += x[a] * model.covariance[a][b] * x[b];
  }
  const se = Math.sqrt(Math.max(variance, 0));
  const z = twoSidedCriticalValue(level);
  return { probability: logistic(eta), ci: [logistic(eta - z * se), logistic(eta + z * se)], linearPredictor: eta, se, reason: null };
}

/** 1 / (1 + e^-eta) without overflow. */
function logistic(eta: number): number {
  if (eta >= 0) return 1 / (1 + Math.exp(-eta));
  const e = Math.exp(eta);
  return e / (1 + e);
}
