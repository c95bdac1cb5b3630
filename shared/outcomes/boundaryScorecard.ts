import { formatMyr } from "../format/ages";
import { wilsonInterval } from "../stats/wilsonInterval";
import { DEPARTURE_Z } from "./crisisTurnover";

/** The conventional loss above which an event is called a mass extinction (common practice, no single source). */
export const MASS_EXTINCTION_CONVENTION = 0.3;
/** Groups with fewer taxa at risk are listed but not read as hit or spared: one or two taxa make no rate. */
export const MIN_GROUP_AT_RISK = 5;
/** Breadth and geography "meet" when at least this share of the groups read lose more than the chosen share (Stratasieve's choice). */
export const BROAD_SHARE_OF_GROUPS = 0.5;

export const SCORECARD_SOURCE =
  "The criteria are those the trade commonly uses to call an event a mass extinction (common practice, no single source); the cut-offs are conventions, not natural breaks.";
export const SCORECARD_CAUTION =
  "A scorecard from one study's taxa is not a global verdict: it reads only the taxa, region and time span this study holds.";

export type ScorecardStatus = "meets" | "falls short" | "uncertain" | "reported" | "not assessable";
export type ScorecardCriterion = "magnitude" | "breadth" | "realms" | "geography" | "brevity" | "standingOut";

/** Victims and taxa at risk (victims + survivors) of one group: a higher taxon, a trait state, a realm, a region. */
export interface GroupLoss {
  name: string;
  victims: number;
  atRisk: number;
}

export interface GroupLossRow extends GroupLoss {
  /** victims / atRisk; null when none at risk. */
  proportion: number | null;
  ci: [number, number] | null;
  /** Lost more than the chosen share; null when fewer than MIN_GROUP_AT_RISK taxa were at risk. */
  over: boolean | null;
}

export interface LossDimension {
  /** e.g. "higherTaxon" or a trait key. */
  key: string;
  label: string;
  /** Groups with at least MIN_GROUP_AT_RISK taxa at risk. */
  assessed: number;
  /** Of those, how many lost more than the chosen share. */
  over: number;
  /** over / assessed; null when none assessed. */
  share: number | null;
  groups: GroupLossRow[];
}

export interface ScorecardItem {
  criterion: ScorecardCriterion;
  label: string;
  status: ScorecardStatus;
  /** The reading in one or two sentences (or why it cannot be read). */
  summary: string;
  /** The number the criterion reads (a proportion, a share of groups, a window in Myr, a z); null when not assessable. */
  value: number | null;
  ci: [number, number] | null;
  dimensions: LossDimension[];
}

export interface BoundaryScorecardInput {
  victims: number;
  atRisk: number;
  /** Window below the boundary in Myr. */
  windowMyr: number;
  higherTaxa: GroupLoss[];
  /** Each state-coded trait's states. */
  traits: Array<{ key: string; label: string; groups: GroupLoss[] }>;
  /** The states of the trait coding realm or environment (marine, non-marine...); null when the study codes none. */
  realm: { key: string; label: string; groups: GroupLoss[] } | null;
  /** The states of a trait naming regions; or why geography cannot be read. */
  geography: { key: string; label: string; groups: GroupLoss[] } | { notAssessable: string };
  /** The crisis stage's extinction contrast (crisisTurnover); reason says why z is null when it is. */
  standingOut: { z: number | null; n: number; reason: string | null };
  /** The conventional loss, 0.3 unless given. */
  threshold?: number;
  /** A group is hit when it loses more than this share, 0.3 unless given. */
  breadthShare?: number;
  level?: number;
}

export interface BoundaryScorecard {
  items: ScorecardItem[];
  threshold: number;
  breadthShare: number;
  level: number;
  minGroupAtRisk: number;
  source: string;
  caution: string;
}

const percent = (x: number) => `${(x * 100).toFixed(x < 0.1 && x > 0 ? 1 : 0)}%`;
const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

function lossDimension(key: string, label: string, groups: GroupLoss[], share: number, level: number): LossDimension {
  const rows = groups.map((g) => {
    const proportion = g.atRisk > 0 ? g.victims / g.atRisk : null;
    return {
      ...g,
      proportion,
      ci: g.atRisk > 0 ? wilsonInterval(g.victims, g.atRisk, { level }) : null,
      over: g.atRisk >= MIN_GROUP_AT_RISK && proportion !== null ? proportion > share : null,
    };
  });
  const assessed = rows.filter((r) => r.over !== null).length;
  const over = rows.filter((r) => r.over === true).length;
  return { key, label, assessed, over, share: assessed > 0 ? over / assessed : null, groups: rows };
}

function notAssessable(criterion: ScorecardCriterion, label: string, why: string, dimensions: LossDimension[] = []): ScorecardItem {
  return { criterion, label, status: "not assessable", summary: `Not assessable from this study: ${why}`, value: null, ci: null, dimensions };
}

/**
 * The boundary scorecard: the criteria the trade commonly reads to call an event a mass extinction (common
 * practice, no single source), each computed from the study's taxa where it can be and "not assessable" where it
 * cannot.
 *   magnitude: victims / atRisk against the ~30% convention, with a Wilson (1927) interval: meets when the whole
 *     interval lies above the convention, falls short when it lies below, uncertain when it spans it;
 *   breadth: the share of higher taxa (with at least 5 taxa at risk) losing more than `breadthShare`; meets at half
 *     or more (Stratasieve's choice). Each trait's states are read the same way and listed;
 *   realms: meets when two or more states of the realm trait (e.g. marine and non-marine) each lose more than the
 *     share, falls short when one or none does; not assessable without such a trait or with fewer than two realms read;
 *   geography: as breadth, over the states of a trait naming regions;
 *   brevity: the window (Myr) within which the losses are placed, reported (the data resolve no finer);
 *   standing out: the crisis stage's robust z of extinction (crisisTurnover): meets at z >= 3.5 (Iglewicz &
 *     Hoaglin 1993).
 *
 * @example
 * boundaryScorecard({ victims: 180, atRisk: 380, windowMyr: 6.6, higherTaxa: [...], traits: [], realm: null,
 *   geography: { notAssessable: "no trait names regions" }, standingOut: { z: 14, n: 6, reason: null } })
 * // magnitude: 180/380 = 47.4%, Wilson 95% 42.4-52.4%: "meets"; realms: "not assessable"; standing out: "meets"
 */
export function boundaryScorecard(input: BoundaryScorecardInput): BoundaryScorecard {
  const threshold = input.threshold ?? MASS_EXTINCTION_CONVENTION;
  const share = input.breadthShare ?? MASS_EXTINCTION_CONVENTION;
  const level = input.level ?? 0.95;
  const levelWords = `${Math.round(level * 100)}%`;
  const items: ScorecardItem[] = [];

  // Magnitude
  if (input.atRisk > 0) {
    const value = input.victims / input.atRisk;
    const ci = wilsonInterval(input.victims, input.atRisk, { level });
    const status: ScorecardStatus = ci[0] > threshold ? "meets" : ci[1] < threshold ? "falls short" : "uncertain";
    const reading = {
      meets: `the whole interval lies above the ~${percent(threshold)} convention`,
      "falls short": `the whole interval lies below the ~${percent(threshold)} convention`,
      uncertain: `the interval spans the ~${percent(threshold)} convention`,
    }[status as "meets" | "falls short" | "uncertain"];
    items.push({
      criterion: "magnitude",
      label: "Magnitude",
      status,
      summary: `${input.victims} of ${input.atRisk} taxa at risk lost (${percent(value)}, ${levelWords} Wilson interval ${percent(ci[0])} to ${percent(ci[1])}): ${reading}.`,
      value,
      ci,
      dimensions: [],
    });
  } else {
    items.push(notAssessable("magnitude", "Magnitude", "no taxon is at risk across this boundary."));
  }

  // Breadth
  const clades = lossDimension("higherTaxon", "Higher taxa", input.higherTaxa, share, level);
  const traitDimensions = input.traits.map((t) => lossDimension(t.key, t.label, t.groups, share, level));
  if (clades.assessed >= 2) {
    const status: ScorecardStatus = clades.share! >= BROAD_SHARE_OF_GROUPS ? "meets" : "falls short";
    const traitWords = traitDimensions
      .filter((d) => d.assessed > 0)
      .map((d) => `${d.label}: ${d.over} of ${d.assessed} states`)
      .join("; ");
    items.push({
      criterion: "breadth",
      label: "Breadth",
      status,
      summary:
        `${clades.over} of ${plural(clades.assessed, "higher taxon", "higher taxa")} with at least ${MIN_GROUP_AT_RISK} taxa at risk lost more than ${percent(share)}` +
        `${traitWords ? ` (${traitWords})` : ""}; broad when half or more do.`,
      value: clades.share,
      ci: null,
      dimensions: [clades, ...traitDimensions],
    });
  } else {
    items.push(
      notAssessable("breadth", "Breadth", `fewer than two higher taxa have at least ${MIN_GROUP_AT_RISK} taxa at risk.`, [clades, ...traitDimensions]),
    );
  }

  // Realms
  if (!input.realm) {
    items.push(notAssessable("realms", "Realms", "the codebook has no trait for environment or realm (marine, non-marine)."));
  } else {
    const realms = lossDimension(input.realm.key, input.realm.label, input.realm.groups, share, level);
    if (realms.assessed < 2) {
      items.push(notAssessable("realms", "Realms", `fewer than two states of ${input.realm.label} have at least ${MIN_GROUP_AT_RISK} taxa at risk.`, [realms]));
    } else {
      const hit = realms.groups.filter((g) => g.over === true).map((g) => g.name);
      items.push({
        criterion: "realms",
        label: "Realms",
        status: realms.over >= 2 ? "meets" : "falls short",
        summary:
          `${realms.over} of ${realms.assessed} states of ${input.realm.label} lost more than ${percent(share)}` +
          `${hit.length ? ` (${hit.join(", ")})` : ""}; several realms hit when two or more do.`,
        value: realms.share,
        ci: null,
        dimensions: [realms],
      });
    }
  }

  // Geography
  if ("notAssessable" in input.geography) {
    items.push(notAssessable("geography", "Geography", input.geography.notAssessable));
  } else {
    const regions = lossDimension(input.geography.key, input.geography.label, input.geography.groups, share, level);
    if (regions.assessed < 2) {
      items.push(notAssessable("geography", "Geography", `fewer than two states of ${input.geography.label} have at least ${MIN_GROUP_AT_RISK} taxa at risk.`, [regions]));
    } else {
      items.push({
        criterion: "geography",
        label: "Geography",
        status: regions.share! >= BROAD_SHARE_OF_GROUPS ? "meets" : "falls short",
        summary: `${regions.over} of ${regions.assessed} states of ${input.geography.label} lost more than ${percent(share)}; widespread when half or more do.`,
        value: regions.share,
        ci: null,
        dimensions: [regions],
      });
    }
  }

  // Brevity
  items.push({
    criterion: "brevity",
    label: "Brevity",
    status: "reported",
    summary:
      input.windowMyr > 0
        ? `The losses are placed within a window of ${formatMyr(input.windowMyr)} below the boundary; the ranges cannot say whether they came at once or spread across it.`
        : "The window is 0 Myr: only taxa last seen at the boundary itself count as victims.",
    value: input.windowMyr,
    ci: null,
    dimensions: [],
  });

  // Standing out
  const { z, n, reason } = input.standingOut;
  if (z === null) {
    items.push(notAssessable("standingOut", "Standing out", `${reason ?? "the crisis stage cannot be compared with its background"}.`));
  } else {
    items.push({
      criterion: "standingOut",
      label: "Standing out",
      status: z >= DEPARTURE_Z ? "meets" : "falls short",
      summary: `The crisis stage's extinction rate lies ${z.toFixed(1)} robust standard deviations from the median of ${n} other stages; it stands out at ${DEPARTURE_Z} or more.`,
      value: z,
      ci: null,
      dimensions: [],
    });
  }

  return { items, threshold, breadthShare: share, level, minGroupAtRisk: MIN_GROUP_AT_RISK, source: SCORECARD_SOURCE, caution: SCORECARD_CAUTION };
}
