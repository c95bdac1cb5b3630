// The demo study: an invented crisis in an invented basin, drawn from a fixed seed so that every
// machine gets exactly the same data. Pure (no database); scripts/seed/demo/seed.ts writes it.
//
// The scenario: about 1,200 invented genera of the Vessiran Basin (invented) live through the
// Early and early Late Cretaceous stages. In every stage a fixed share dies out (background); at
// the end of the Cenomanian (the base of the Turonian) the genera alive meet a crisis whose
// extinction odds follow a logistic model with known ("planted") effects. An analysis of the data
// should find those effects, and should flag the one trait that only looks selective.
import { SUGGESTED_CODEBOOK, type SuggestedTrait } from "../../../shared/codebook";
import { findUnit, type TimescaleUnit } from "../../../shared/timescale/index";
import { epithet, genusName, mulberry32, uniqueNames, type Random } from "./names";

/** The committed seed of the demo study. Changing it changes every generated value. */
export const DEMO_SEED = 939;
export const DEMO_BASIN = "Vessiran Basin (invented)";
export const DEMO_GENUS_COUNT = 1200;
export const DEMO_MODERN_SPECIES_COUNT = 180;

export type TraitValues = Record<string, string | number>;

export interface DemoTaxon {
  name: string;
  higherTaxon: string;
  /** First and last appearance in Ma; null where the range has not been compiled (a planted data problem). */
  fadMa: number | null;
  ladMa: number | null;
  /** Set when the range was given as stages of the time scale (ages then are the stages' base and top). */
  fadInterval?: string;
  ladInterval?: string;
  notes: string;
  /** Keyed by trait key (the seed re-keys them by trait id). Absent key = not coded. */
  values: TraitValues;
}

/** IUCN Red List Categories and Criteria, version 3.1 (IUCN 2012): the category codes. */
export const IUCN_CATEGORIES = ["EX", "EW", "CR", "EN", "VU", "NT", "LC", "DD", "NE"] as const;
export type IucnCategory = (typeof IUCN_CATEGORIES)[number];

export interface DemoModernSpecies {
  name: string;
  higherTaxon: string;
  category: IucnCategory;
  /** Raw list columns, phrased unlike the study's codebook so the crosswalk has work to do. */
  traits: Record<string, string>;
}

/**
 * The effects written into the crisis, on the log-odds scale. For a genus at risk at the base of the
 * Turonian (alive in the Cenomanian), the chance of dying out at the boundary is
 *   logit p = interceptLogOdds
 *           + smallRangeLogOdds  * [geographic_range <= smallRangeMaxRegions]
 *           + feedingLogOdds     * [feeding = feedingMode]
 *           + cladeLogOdds       * [higher taxon = hardHitClade]
 * and nothing else: the confounded life habit has NO direct effect (confoundedLifeHabitLogOdds = 0),
 * but most genera with it belong to the hard-hit clade, so its crude odds ratio is far from 1 while
 * its odds ratio within clades is about 1.
 */
export interface PlantedEffects {
  boundary: { stage: string; ageMa: number; windowMyr: number };
  interceptLogOdds: number;
  smallRangeMaxRegions: number;
  smallRangeLogOdds: number;
  feedingMode: string;
  feedingLogOdds: number;
  hardHitClade: string;
  cladeLogOdds: number;
  confoundedLifeHabit: string;
  confoundedLifeHabitLogOdds: 0;
  /** Share of the hard-hit clade's genera that have the confounded life habit (the others' shares are below 0.15). */
  confoundedShareInHardHitClade: number;
  /** Chance of dying out in each background stage, for every genus alike. */
  backgroundExtinction: Record<string, number>;
}

export interface DemoStudy {
  seed: number;
  study: { name: string; description: string };
  traits: SuggestedTrait[];
  taxa: DemoTaxon[];
  modernList: { name: string; species: DemoModernSpecies[] };
  plantedEffects: PlantedEffects;
}

// ---------------------------------------------------------------------------------------------
// Scenario constants

/** Stages the genera live through, oldest first; the record of the basin ends in the Campanian. */
const STAGE_NAMES = ["Hauterivian", "Barremian", "Aptian", "Albian", "Cenomanian", "Turonian", "Coniacian", "Santonian", "Campanian"] as const;
type StageName = (typeof STAGE_NAMES)[number];
const CRISIS_STAGE: StageName = "Cenomanian";

/** Where genera first appear (relative weights); none after the Coniacian so every genus has time to live. */
const ORIGINATION_WEIGHTS: Partial<Record<StageName, number>> = {
  Hauterivian: 0.05,
  Barremian: 0.07,
  Aptian: 0.11,
  Albian: 0.19,
  Cenomanian: 0.33,
  Turonian: 0.13,
  Coniacian: 0.12,
};

/** Background chance of dying out within each stage (the Campanian closes the record: no draws). */
const BACKGROUND_EXTINCTION: Record<string, number> = {
  Hauterivian: 0.13,
  Barremian: 0.15,
  Aptian: 0.14,
  Albian: 0.16,
  Turonian: 0.13,
  Coniacian: 0.15,
  Santonian: 0.16,
};

const REGIONS_IN_BASIN = 14;
const HARD_HIT_CLADE = "Quellorbidae";

interface CladeProfile {
  name: string;
  weight: number;
  marineShare: number;
  lifeHabit: Record<string, number>;
  feeding: Record<string, number>;
  /** Median body size in mm; sizes are log-normal with a spread of 0.25 log10 units. */
  medianSizeMm: number;
}

// Feeding shares are drawn per clade, independently of life habit, so that within a clade the life
// habit says nothing about the outcome: this is what makes the life habit a pure confounder.
const CLADES: CladeProfile[] = [
  { name: HARD_HIT_CLADE, weight: 0.18, marineShare: 1, lifeHabit: { infaunal: 0.75, epifaunal: 0.25 }, feeding: { suspension: 0.5, deposit: 0.28, grazer: 0.1, predator: 0.12 }, medianSizeMm: 35 },
  { name: "Vessiranthidae", weight: 0.11, marineShare: 1, lifeHabit: { epifaunal: 0.9, infaunal: 0.1 }, feeding: { suspension: 0.7, deposit: 0.2, grazer: 0.1 }, medianSizeMm: 18 },
  { name: "Tarnoceratidae", weight: 0.09, marineShare: 1, lifeHabit: { nektonic: 0.95, epifaunal: 0.05 }, feeding: { predator: 0.8, grazer: 0.1, deposit: 0.1 }, medianSizeMm: 120 },
  { name: "Ombrinellidae", weight: 0.08, marineShare: 1, lifeHabit: { planktonic: 1 }, feeding: { suspension: 0.6, grazer: 0.3, predator: 0.1 }, medianSizeMm: 0.4 },
  { name: "Saxopleuridae", weight: 0.1, marineShare: 1, lifeHabit: { epifaunal: 0.83, infaunal: 0.1, nektonic: 0.07 }, feeding: { grazer: 0.55, deposit: 0.3, predator: 0.15 }, medianSizeMm: 22 },
  { name: "Cirrovandidae", weight: 0.09, marineShare: 1, lifeHabit: { epifaunal: 0.85, infaunal: 0.15 }, feeding: { deposit: 0.5, suspension: 0.2, grazer: 0.3 }, medianSizeMm: 40 },
  { name: "Poltrynidae", weight: 0.08, marineShare: 1, lifeHabit: { epifaunal: 0.82, nektonic: 0.1, infaunal: 0.08 }, feeding: { predator: 0.6, deposit: 0.25, grazer: 0.15 }, medianSizeMm: 30 },
  { name: "Wendrospidae", weight: 0.06, marineShare: 1, lifeHabit: { epifaunal: 1 }, feeding: { suspension: 0.9, predator: 0.1 }, medianSizeMm: 12 },
  { name: "Ixothalidae", weight: 0.06, marineShare: 0.7, lifeHabit: { epifaunal: 0.58, nektonic: 0.3, infaunal: 0.12 }, feeding: { deposit: 0.35, predator: 0.35, suspension: 0.3 }, medianSizeMm: 60 },
  { name: "Feldrasmidae", weight: 0.06, marineShare: 0, lifeHabit: { epifaunal: 0.86, infaunal: 0.1, nektonic: 0.04 }, feeding: { grazer: 0.6, deposit: 0.4 }, medianSizeMm: 9 },
  { name: "Glaumeridae", weight: 0.05, marineShare: 0, lifeHabit: { terrestrial: 1 }, feeding: { predator: 0.4, grazer: 0.4, deposit: 0.2 }, medianSizeMm: 15 },
  { name: "Brunnocaridae", weight: 0.05, marineShare: 0, lifeHabit: { nektonic: 0.45, epifaunal: 0.4, infaunal: 0.15 }, feeding: { deposit: 0.4, predator: 0.3, suspension: 0.3 }, medianSizeMm: 25 },
];

const PLANTED = {
  interceptLogOdds: -1.5,
  smallRangeMaxRegions: 2,
  smallRangeLogOdds: 1.4,
  feedingMode: "deposit",
  feedingLogOdds: 1.1,
  cladeLogOdds: 2.3,
  confoundedLifeHabit: "infaunal",
} as const;

/** The note of every genus without a planted problem (problem notes start with it). */
export const INVENTED_NOTE = "Invented genus of the Vessiran Basin demo.";

// ---------------------------------------------------------------------------------------------
// Small helpers

function stageUnit(name: string): TimescaleUnit {
  const unit = findUnit(name);
  if (!unit) throw new Error(`The time scale has no stage "${name}"`);
  return unit;
}

function weighted<T extends string>(random: Random, weights: Partial<Record<T, number>>): T {
  const entries = Object.entries(weights) as Array<[T, number]>;
  const total = entries.reduce((sum, [, w]) => sum + w, 0);
  let u = random() * total;
  for (const [key, w] of entries) {
    u -= w;
    if (u < 0) return key;
  }
  return entries[entries.length - 1][0];
}

/** Standard normal draw (Box-Muller). */
function normal(random: Random): number {
  const u = 1 - random(); // (0, 1], so the logarithm is finite
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random());
}

const logistic = (x: number) => 1 / (1 + Math.exp(-x));
const round2 = (x: number) => Math.round(x * 100) / 100;

/** An age strictly inside the stage (never on its base or top), to 0.01 Myr. */
function ageWithin(random: Random, stage: TimescaleUnit): number {
  const lo = stage.top + 0.01;
  const hi = stage.base - 0.01;
  return round2(lo + random() * (hi - lo));
}

function sizeMm(random: Random, median: number): number {
  const mm = 10 ** (Math.log10(median) + 0.25 * normal(random));
  return mm < 10 ? Math.round(mm * 100) / 100 : Math.round(mm * 10) / 10;
}

/** Regions of the basin with occurrences: 1 + an exponential count with mean 3.2, at most the basin's 14. */
function regions(random: Random): number {
  return Math.min(REGIONS_IN_BASIN, 1 + Math.floor(-Math.log(1 - random()) * 3.2));
}

function crisisLogOdds(values: TraitValues, clade: string): number {
  return (
    PLANTED.interceptLogOdds +
    (Number(values.geographic_range) <= PLANTED.smallRangeMaxRegions ? PLANTED.smallRangeLogOdds : 0) +
    (values.feeding === PLANTED.feedingMode ? PLANTED.feedingLogOdds : 0) +
    (clade === HARD_HIT_CLADE ? PLANTED.cladeLogOdds : 0)
  );
}

function drawTraits(random: Random, clade: CladeProfile): TraitValues {
  return {
    environment: random() < clade.marineShare ? "marine" : "nonmarine",
    life_habit: weighted(random, clade.lifeHabit),
    feeding: weighted(random, clade.feeding),
    body_size: sizeMm(random, clade.medianSizeMm),
    geographic_range: regions(random),
  };
}

// ---------------------------------------------------------------------------------------------
// The fossil genera

const CLADE_WEIGHTS = Object.fromEntries(CLADES.map((c) => [c.name, c.weight]));
const cladeByName = new Map(CLADES.map((c) => [c.name, c]));

interface DrawnGenus {
  clade: string;
  values: TraitValues;
  /** Index into STAGE_NAMES of the stage of first and of last appearance. */
  originIndex: number;
  extinctionIndex: number;
}

/** Draws a genus's clade and traits, then walks it through the stages until it dies out. */
function drawGenus(random: Random, stages: TimescaleUnit[]): DrawnGenus {
  const clade = weighted(random, CLADE_WEIGHTS);
  const values = drawTraits(random, cladeByName.get(clade)!);
  const originIndex = STAGE_NAMES.indexOf(weighted(random, ORIGINATION_WEIGHTS));
  let extinctionIndex = stages.length - 1; // still alive when the basin's record ends
  for (let i = originIndex; i < stages.length - 1; i++) {
    const stage = STAGE_NAMES[i];
    const p = stage === CRISIS_STAGE ? logistic(crisisLogOdds(values, clade)) : BACKGROUND_EXTINCTION[stage];
    if (random() < p) {
      extinctionIndex = i;
      break;
    }
  }
  return { clade, values, originIndex, extinctionIndex };
}

/** Ages (and, for some genera, stage names) of a drawn range. */
function drawRange(random: Random, genus: DrawnGenus, stages: TimescaleUnit[]): Pick<DemoTaxon, "fadMa" | "ladMa" | "fadInterval" | "ladInterval"> {
  const origin = stages[genus.originIndex];
  const last = stages[genus.extinctionIndex];
  // About a fifth of the genera come from sources that give stages, not ages. Not for genera last seen
  // in the Albian: the top of the Albian is the far edge of the default window (the base of the
  // Cenomanian), where such a range would count as a victim although the genus died out before.
  const intervalCoded = random() < 0.2 && STAGE_NAMES[genus.extinctionIndex] !== "Albian";
  if (intervalCoded) return { fadMa: origin.base, ladMa: last.top, fadInterval: origin.name, ladInterval: last.name };
  let fad = ageWithin(random, origin);
  let lad: number;
  if (STAGE_NAMES[genus.extinctionIndex] === CRISIS_STAGE) {
    // Victims cluster below the boundary; some are last seen in the boundary bed itself.
    lad = random() < 0.15 ? last.top : round2(last.top + 0.01 + (last.base - last.top - 0.02) * random() ** 2);
  } else {
    lad = ageWithin(random, last);
  }
  if (genus.originIndex === genus.extinctionIndex && fad < lad) [fad, lad] = [lad, fad];
  if (fad === lad) fad = round2(fad + 0.01);
  return { fadMa: fad, ladMa: lad };
}

function drawTaxa(random: Random): DemoTaxon[] {
  const stages = STAGE_NAMES.map(stageUnit);
  const names = uniqueNames(random, DEMO_GENUS_COUNT, genusName);
  const drawn = names.map(() => drawGenus(random, stages));
  const taxa: DemoTaxon[] = drawn.map((genus, i) => ({
    name: names[i],
    higherTaxon: genus.clade,
    ...drawRange(random, genus, stages),
    notes: INVENTED_NOTE,
    values: genus.values,
  }));
  plantDataProblems(random, taxa, drawn);
  return taxa;
}

/** Indices of `count` distinct taxa satisfying `accept`, drawn with the seeded numbers. */
function chooseTaxa(random: Random, taxa: DemoTaxon[], count: number, accept: (t: DemoTaxon, i: number) => boolean, avoid: Set<number>): number[] {
  const candidates = taxa.map((_, i) => i).filter((i) => !avoid.has(i) && accept(taxa[i], i));
  const chosen: number[] = [];
  while (chosen.length < count && candidates.length) {
    const [index] = candidates.splice(Math.floor(random() * candidates.length), 1);
    chosen.push(index);
    avoid.add(index);
  }
  return chosen;
}

/**
 * The problems a careful analyst should be warned about: ranges not yet compiled, genera whose only
 * record after the boundary is reworked, and some values not coded. (Genera known from a single stage
 * arise on their own: about one in six dies out in the stage it appears in.)
 */
function plantDataProblems(random: Random, taxa: DemoTaxon[], drawn: DrawnGenus[]): void {
  const used = new Set<number>();
  for (const i of chooseTaxa(random, taxa, 4, (t) => !t.fadInterval, used)) {
    taxa[i].fadMa = null;
    taxa[i].notes = `${INVENTED_NOTE} First appearance not yet compiled from the collection registers.`;
  }
  for (const i of chooseTaxa(random, taxa, 3, (t) => !t.ladInterval, used)) {
    taxa[i].ladMa = null;
    taxa[i].notes = `${INVENTED_NOTE} Last appearance not yet compiled: the upper part of its section is unlogged.`;
  }
  // Two crisis victims (age-coded) whose data say "survivor": their only Turonian record is reworked.
  const victims = (t: DemoTaxon, i: number) => STAGE_NAMES[drawn[i].extinctionIndex] === CRISIS_STAGE && !t.ladInterval && t.ladMa !== null;
  const turonian = stageUnit("Turonian");
  for (const i of chooseTaxa(random, taxa, 2, victims, used)) {
    taxa[i].ladMa = ageWithin(random, turonian);
    taxa[i].notes =
      `${INVENTED_NOTE} Its only Turonian occurrence comes from reworked material in a channel fill; ` +
      "the true last appearance is probably Cenomanian.";
  }
  for (const i of chooseTaxa(random, taxa, 24, () => true, used)) {
    delete taxa[i].values.body_size;
    taxa[i].notes = `${INVENTED_NOTE} No measurable specimen; body size not coded.`;
  }
}

// ---------------------------------------------------------------------------------------------
// The modern list

const HABITAT_WORDS: Record<string, string> = { marine: "sea", nonmarine: "freshwater" };
const POSITION_WORDS: Record<string, string> = {
  epifaunal: "on the bottom",
  infaunal: "burrowing",
  nektonic: "swimming",
  planktonic: "drifting",
  terrestrial: "on land",
};
const DIET_WORDS: Record<string, string> = { suspension: "filter feeder", deposit: "sediment eater", predator: "hunter", grazer: "scraper" };
const invert = (words: Record<string, string>) => Object.fromEntries(Object.entries(words).map(([code, word]) => [word, code]));

/**
 * The crosswalk the modern list was written with: list column -> study trait, and for categorical
 * columns each phrase -> state code. Values missing here ("unknown", "parasite of fishes") map to
 * no state on purpose. Numeric columns carry the trait's own unit.
 */
export const MODERN_CROSSWALK = {
  habitat: { trait: "environment", states: { ...invert(HABITAT_WORDS), land: "nonmarine" } },
  position: { trait: "life_habit", states: invert(POSITION_WORDS) },
  diet: { trait: "feeding", states: invert(DIET_WORDS) },
  length_mm: { trait: "body_size" },
  ecoregions: { trait: "geographic_range" },
} as const satisfies Record<string, { trait: string; states?: Record<string, string> }>;

/**
 * Threat category from the same risk factors as the crisis, plus noise: listed threatened (CR, EN, VU)
 * with the crisis model's chance, graded by how high the risk is; a few data deficient or not evaluated.
 */
function modernCategory(random: Random, values: TraitValues, clade: string): IucnCategory {
  const risk = crisisLogOdds(values, clade) + 0.8 * normal(random);
  const u = random();
  if (u < 0.06) return "DD";
  if (u < 0.09) return "NE";
  if (random() < logistic(risk)) return risk > 1.2 ? "CR" : risk > 0.2 ? "EN" : "VU";
  return risk > -1 ? "NT" : "LC";
}

function drawModernList(random: Random, fossilNames: Set<string>): DemoStudy["modernList"] {
  const genera = uniqueNames(random, 60, genusName, fossilNames);
  const taken = new Set<string>();
  const species: DemoModernSpecies[] = [];
  while (species.length < DEMO_MODERN_SPECIES_COUNT) {
    const name = `${genera[Math.floor(random() * genera.length)]} ${epithet(random)}`;
    if (taken.has(name)) continue;
    taken.add(name);
    const clade = weighted(random, CLADE_WEIGHTS);
    const values = drawTraits(random, cladeByName.get(clade)!);
    const category = modernCategory(random, values, clade);
    const habitat = values.life_habit === "terrestrial" ? "land" : HABITAT_WORDS[values.environment];
    // A few raw values map onto no state of the codebook: the crosswalk must leave them uncoded.
    const position = random() < 0.04 ? "unknown" : POSITION_WORDS[values.life_habit];
    const diet = random() < 0.03 ? "parasite of fishes" : DIET_WORDS[values.feeding];
    species.push({
      name: `${name} (invented)`,
      higherTaxon: clade,
      category,
      traits: { habitat, position, diet, length_mm: String(values.body_size), ecoregions: String(values.geographic_range) },
    });
  }
  // Two recently lost species, from the highest-risk end of the list.
  const extinct = species.filter((s) => s.category === "CR").slice(0, 2);
  for (const s of extinct) s.category = "EX";
  return { name: "Vessiran coasts and lakes: modern species (invented)", species };
}

// ---------------------------------------------------------------------------------------------

/** Generates the whole demo study from a seed; the same seed always gives the same data. */
export function generateDemoStudy(seed: number = DEMO_SEED): DemoStudy {
  const random = mulberry32(seed);
  const taxa = drawTaxa(random);
  const modernList = drawModernList(random, new Set(taxa.map((t) => t.name)));
  const boundary = stageUnit("Turonian");
  const window = stageUnit(CRISIS_STAGE);
  const plantedEffects: PlantedEffects = {
    boundary: { stage: boundary.name, ageMa: boundary.base, windowMyr: window.duration },
    interceptLogOdds: PLANTED.interceptLogOdds,
    smallRangeMaxRegions: PLANTED.smallRangeMaxRegions,
    smallRangeLogOdds: PLANTED.smallRangeLogOdds,
    feedingMode: PLANTED.feedingMode,
    feedingLogOdds: PLANTED.feedingLogOdds,
    hardHitClade: HARD_HIT_CLADE,
    cladeLogOdds: PLANTED.cladeLogOdds,
    confoundedLifeHabit: PLANTED.confoundedLifeHabit,
    confoundedLifeHabitLogOdds: 0,
    confoundedShareInHardHitClade: cladeByName.get(HARD_HIT_CLADE)!.lifeHabit[PLANTED.confoundedLifeHabit],
    backgroundExtinction: { ...BACKGROUND_EXTINCTION },
  };
  return {
    seed,
    study: {
      name: "Vessiran Basin across the Cenomanian-Turonian boundary (invented demo)",
      description:
        `Invented demonstration data: ${DEMO_GENUS_COUNT} invented genera of the ${DEMO_BASIN}, from the Hauterivian ` +
        `to the Campanian, with a crisis at the base of the Turonian (${boundary.base} Ma). No taxon, place or record ` +
        "here is real. Effects planted in the data: a narrow geographic range (at most " +
        `${PLANTED.smallRangeMaxRegions} regions) and deposit feeding raise the odds of extinction; the ${HARD_HIT_CLADE} ` +
        "were hit hard; an infaunal life habit only looks selective because most infaunal genera are " +
        `${HARD_HIT_CLADE}. Generated from seed ${seed}.`,
    },
    traits: SUGGESTED_CODEBOOK.map((t) => ({ ...t, states: t.states.map((s) => ({ ...s })) })),
    taxa,
    modernList,
    plantedEffects,
  };
}
