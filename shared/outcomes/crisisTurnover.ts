import { backgroundContrast, type BackgroundContrast } from "./backgroundContrast";

/**
 * |z| from which a stage is said to depart from its background: the cut-off Iglewicz & Hoaglin (1993, How to
 * detect and handle outliers, ASQC Quality Press) suggest for the modified (median and MAD) z-score.
 */
export const DEPARTURE_Z = 3.5;

export interface RateContrast extends BackgroundContrast {
  /** The crisis stage's own rate; null when undefined. */
  value: number | null;
  /** |z| >= DEPARTURE_Z; null when z is null. */
  departs: boolean | null;
  /** Why z is null, in words (null when there is a z). */
  reason: string | null;
}

export interface CrisisTurnover {
  extinction: RateContrast;
  origination: RateContrast;
  /** Which rate departs from its background at the crisis stage. */
  departing: "extinction" | "origination" | "both" | "neither" | "not assessable";
  /** The finding in one plain sentence. */
  sentence: string;
}

function whyNoZ(c: BackgroundContrast, value: number | null): string {
  if (value === null) return "its rate is undefined in this stage";
  if (c.n < 5) return `only ${c.n} other stage${c.n === 1 ? " has" : "s have"} a rate (5 are needed)`;
  return "the other stages' rates do not vary (their MAD is 0)";
}

function contrastOf(values: Array<number | null>, index: number): RateContrast {
  const contrast = backgroundContrast(values, index);
  const own = values[index] ?? null;
  const value = own !== null && Number.isFinite(own) ? own : null;
  const noZ = contrast.z === null;
  return { ...contrast, value, departs: noZ ? null : Math.abs(contrast.z!) >= DEPARTURE_Z, reason: noZ ? whyNoZ(contrast, value) : null };
}

const zWords = (z: number) => `z = ${z.toFixed(1)}`;

/**
 * How far the crisis stage's per-capita extinction (q) and origination (p) rates stand out from the study's
 * other stages (backgroundContrast on each), and which of the two departs from its background: |z| >= 3.5,
 * the cut-off of Iglewicz & Hoaglin (1993). A diversity drop can come from elevated extinction or from
 * depressed origination, so both are read. `stages` holds each stage's q and p in time order; `index` is the
 * crisis stage (the stage the boundary closes).
 *
 * @example
 * crisisTurnover([{ q: 0.1, p: 0.9 }, { q: 0.15, p: 0.7 }, { q: 0.2, p: 0.7 }, { q: 0.64, p: 0.72 }, { q: 0.19, p: 0.35 }, { q: 0.16, p: 0.23 }, { q: 0.15, p: 0.4 }], 3)
 * // extinction: others 0.1, 0.15, 0.2, 0.19, 0.16, 0.15 -> median 0.155, mad 0.02, z = 0.485 / 0.029652 = 16.36, departs
 * // origination: others 0.9, 0.7, 0.7, 0.35, 0.23, 0.4 -> median 0.55, mad 0.175, z = 0.17 / 0.259455 = 0.655, does not
 * // departing: "extinction"
 */
export function crisisTurnover(stages: Array<{ q: number | null; p: number | null }>, index: number): CrisisTurnover {
  const extinction = contrastOf(stages.map((s) => s.q), index);
  const origination = contrastOf(stages.map((s) => s.p), index);
  let departing: CrisisTurnover["departing"];
  if (extinction.departs === null && origination.departs === null) departing = "not assessable";
  else if (extinction.departs && origination.departs) departing = "both";
  else if (extinction.departs) departing = "extinction";
  else if (origination.departs) departing = "origination";
  else departing = "neither";

  const part = (name: string, c: RateContrast) => {
    if (c.z === null) return `${name} cannot be compared with its background (${c.reason})`;
    const direction = c.z > 0 ? "above" : "below";
    return c.departs
      ? `${name} departs from its background (${zWords(c.z)}, ${direction} the median of ${c.n} other stages)`
      : `${name} stays within its background (${zWords(c.z)}, against ${c.n} other stages)`;
  };
  const sentence = `At the crisis stage, ${part("extinction", extinction)}; ${part("origination", origination)}.`;
  return { extinction, origination, departing, sentence };
}
