// What each colour of a chart means, defined once for the whole app. A colour that carries a
// meaning carries the same one on every screen, in reports and in downloaded charts:
//   clay red  more extinction (or threat) than the reference: an odds ratio above 1
//   teal      less than the reference: an odds ratio below 1
//   grey      the reference itself, or a line of no effect / chance
// Colours that only tell series apart (which odds ratio, today or the past) use hues kept clear of
// those three, so a blue diamond never reads as "lowered the odds". The app's accent (also a teal)
// belongs to buttons, tabs and links, never to data.

/** The direction of an effect on extinction. */
export const RISK_COLOUR = {
  /** Raised the odds of extinction (odds ratio above 1), or a larger share lost than the reference. */
  higher: "#b4441c",
  /** Lowered the odds (odds ratio below 1), or a smaller share lost than the reference. */
  lower: "#17695e",
  /** About even: the middle of a diverging scale. */
  even: "#f7f5f2",
} as const;

/** Things compared against: the reference state, the line of no effect, the chance diagonal. */
export const REFERENCE_COLOUR = "#a8a29e";
/** A cell or estimate that could not be computed. */
export const MISSING_COLOUR = "#e7e5e4";
/** A quantity with no direction of its own (a share lost in a range of values, a count through time). */
export const NEUTRAL_COLOUR = "#78716c";
/** A summary line laid over the data: the share over all taxa, a threshold. */
export const SUMMARY_COLOUR = "#8a5a12";

/** The three odds ratios a run reports, told apart by colour and by marker shape together. */
export const ESTIMATE_COLOUR = {
  crude: "#44403c",
  clade: "#3d5a99",
  model: "#9a5b0c",
} as const;

/** The one drawn with emphasis among its variants (the run's own choice among the robustness variants): ink, not a direction colour. */
export const EMPHASIS_COLOUR = "#1c1917";

/** The chosen boundary drawn across a chart through time. */
export const BOUNDARY_MARK_COLOUR = "#292524";

/** Rates through time: extinction in the clay red of "more extinction"; origination in a blue of its own (it is not "lowered odds"). */
export const TURNOVER_SERIES_COLOUR = {
  extinction: RISK_COLOUR.higher,
  origination: "#3d5a99",
  diversity: "#57534e",
} as const;

/** The two sides of the modern comparison: today's threat listing and the past crisis (its crude odds ratio, as in the run). */
export const COMPARISON_COLOUR = {
  today: "#6b3f8f",
  past: ESTIMATE_COLOUR.crude,
} as const;

export type RiskDirection = keyof typeof RISK_COLOUR;

/** Which way an odds ratio points: above 1 "higher", below 1 "lower", 1 (or none) "even". */
export function directionOfOddsRatio(oddsRatio: number | null | undefined): RiskDirection {
  if (oddsRatio === null || oddsRatio === undefined || !Number.isFinite(oddsRatio) || oddsRatio === 1) return "even";
  return oddsRatio > 1 ? "higher" : "lower";
}

/** Which way a share lost compares with the reference state's share. */
export function directionOfShare(share: number | null | undefined, referenceShare: number | null | undefined): RiskDirection {
  if (share === null || share === undefined || referenceShare === null || referenceShare === undefined || share === referenceShare) return "even";
  return share > referenceShare ? "higher" : "lower";
}

/** The words of the legend, the same wherever the direction colours appear. */
export const RISK_WORDS: Record<RiskDirection, string> = {
  higher: "higher odds of extinction than the reference",
  lower: "lower odds of extinction than the reference",
  even: "about even with the reference",
};
