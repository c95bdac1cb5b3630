// Threat categories of a modern species list, and how a comparison with a past crisis groups them.
//
// The categories and their codes are those of IUCN (2012) Red List Categories and Criteria:
// Version 3.1, second edition (Gland and Cambridge: IUCN), listed there from the highest risk to
// the lowest, followed by the two categories that are not risk levels (DD, NE).
//
// "Threatened" is the standard's own term for the three categories CR, EN and VU. The comparison
// sets them against NT and LC ("not threatened"). EX and EW are kept out of that comparison and
// counted: their species are already lost (in the wild), so they are neither a present threat level
// nor a sign of safety; keeping them out is how comparative studies usually treat them (from memory,
// not verified). DD and NE are kept out and counted because they say nothing about risk.

export const IUCN_CATEGORIES = ["EX", "EW", "CR", "EN", "VU", "NT", "LC", "DD", "NE"] as const;
export type IucnCategory = (typeof IUCN_CATEGORIES)[number];

export const IUCN_CATEGORY_NAMES: Record<IucnCategory, string> = {
  EX: "Extinct",
  EW: "Extinct in the Wild",
  CR: "Critically Endangered",
  EN: "Endangered",
  VU: "Vulnerable",
  NT: "Near Threatened",
  LC: "Least Concern",
  DD: "Data Deficient",
  NE: "Not Evaluated",
};

/** The citation shown wherever categories are read. */
export const IUCN_SOURCE = "IUCN (2012) Red List Categories and Criteria: Version 3.1, second edition";

/** threatened: CR, EN, VU (the standard's definition); notThreatened: NT, LC; the rest are kept out of the comparison. */
export type ThreatGroup = "threatened" | "notThreatened" | "extinct" | "noRiskLevel";

export const THREATENED: readonly IucnCategory[] = ["CR", "EN", "VU"];
export const NOT_THREATENED: readonly IucnCategory[] = ["NT", "LC"];
/** Kept out of the threatened-against-not comparison, and counted. */
export const EXCLUDED_FROM_COMPARISON: readonly IucnCategory[] = ["EX", "EW", "DD", "NE"];

export function threatGroup(category: IucnCategory): ThreatGroup {
  if (THREATENED.includes(category)) return "threatened";
  if (NOT_THREATENED.includes(category)) return "notThreatened";
  if (category === "EX" || category === "EW") return "extinct";
  return "noRiskLevel";
}

/**
 * Ordinal coding of the risk levels for a rank correlation: LC = 0, NT = 1, VU = 2, EN = 3, CR = 4
 * (the steps of the Red List Index weights, Butchart et al. 2004 and 2007, citations from memory;
 * treating them as an ordered scale is common practice in comparative extinction-risk studies, from
 * memory). EX, EW, DD and NE have no place on it.
 */
export const IUCN_ORDINAL: Partial<Record<IucnCategory, number>> = { LC: 0, NT: 1, VU: 2, EN: 3, CR: 4 };

/**
 * A category as written in a list: its code ("vu", " EN ") or its name ("Least Concern"), case-blind;
 * null when it is neither.
 */
export function readIucnCategory(text: string): IucnCategory | null {
  const t = text.trim().replace(/\s+/g, " ").toLowerCase();
  if (!t) return null;
  const byCode = IUCN_CATEGORIES.find((c) => c.toLowerCase() === t);
  if (byCode) return byCode;
  return IUCN_CATEGORIES.find((c) => IUCN_CATEGORY_NAMES[c].toLowerCase() === t) ?? null;
}
