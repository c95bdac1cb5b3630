// The demo study's invented finds (occurrences): a file of dated finds from which the demo's ranges
// derive. Pure (no database); scripts/seed/demo/seed.ts writes them as one committed occurrence upload.
//
// Built so that the published range-through reading of the finds (shared/occurrences deriveRanges, the
// widest range the dates allow) gives back exactly the first and last appearance of every genus in the
// trait table: each genus has a find whose oldest age is its first appearance and one whose youngest age
// is its last; every other find lies between. Genera whose range was left uncompiled (a planted data
// problem) have no finds. In between, each stage a genus lived through holds a find with a chance that
// depends on the stage (how well the invented basin's rocks of that age were collected), so the three-timer
// sampling completeness varies: the Coniacian is poorly sampled on purpose. A separate seeded stream is
// used, so the finds never change the genera, their traits or the planted effects.
import { findUnit, type TimescaleUnit } from "../../../shared/timescale/index";
import type { DemoStudy, DemoTaxon } from "./generator";
import { mulberry32, type Random } from "./names";

export const DEMO_OCCURRENCE_FILE = "vessiran-basin-finds-invented.csv";

/** One invented find as the occurrence upload stores it: ages in Ma, interval names when dated by stage. */
export interface DemoOccurrence {
  taxon: string;
  higherTaxon: string;
  maxMa: number;
  minMa: number;
  earlyInterval: string | null;
  lateInterval: string | null;
  collection: string;
}

/** The stages of the invented record, oldest first (as in generator.ts). */
const STAGES = ["Hauterivian", "Barremian", "Aptian", "Albian", "Cenomanian", "Turonian", "Coniacian", "Santonian", "Campanian"] as const;

/** Chance that a genus alive through a stage left a find in it: how well the basin's rocks of that age were collected (invented). */
export const DEMO_STAGE_SAMPLING: Record<(typeof STAGES)[number], number> = {
  Hauterivian: 0.7,
  Barremian: 0.75,
  Aptian: 0.8,
  Albian: 0.8,
  Cenomanian: 0.85,
  Turonian: 0.8,
  Coniacian: 0.35,
  Santonian: 0.75,
  Campanian: 0.7,
};

/** The stage the demo calls poorly sampled (its three-timer completeness falls below 0.5). */
export const DEMO_POORLY_SAMPLED_STAGE = "Coniacian";

const COLLECTIONS_PER_STAGE = 36;
const round2 = (x: number) => Math.round(x * 100) / 100;

function stageUnit(name: string): TimescaleUnit {
  const unit = findUnit(name);
  if (!unit) throw new Error(`The time scale has no stage "${name}"`);
  return unit;
}

/** The stage of a first appearance: top < age <= base (a first appearance on a limit is the older stage's base). */
function stageOfOldest(units: TimescaleUnit[], age: number): TimescaleUnit {
  const unit = units.find((u) => u.top < age && age <= u.base);
  if (!unit) throw new Error(`No demo stage holds ${age} Ma`);
  return unit;
}

/** The stage of a last appearance: top <= age < base (a last appearance on a limit is the older stage's top). */
function stageOfYoungest(units: TimescaleUnit[], age: number): TimescaleUnit {
  const unit = units.find((u) => u.top <= age && age < u.base);
  if (!unit) throw new Error(`No demo stage holds ${age} Ma`);
  return unit;
}

/** "VB-Cen-07": an invented collection of the basin in one stage. */
const collectionOf = (random: Random, stage: TimescaleUnit) => `VB-${stage.name.slice(0, 3)}-${String(1 + Math.floor(random() * COLLECTIONS_PER_STAGE)).padStart(2, "0")}`;

/**
 * The invented finds of the demo, in a fixed order (genus by genus, oldest find first). Same study in, same finds out.
 */
export function generateDemoOccurrences(data: DemoStudy): DemoOccurrence[] {
  const random = mulberry32(data.seed ^ 0x0cc5_eed);
  const units = STAGES.map(stageUnit);
  const out: DemoOccurrence[] = [];
  for (const taxon of data.taxa) {
    if (taxon.fadMa === null || taxon.ladMa === null) continue;
    out.push(...findsOf(random, units, taxon as DemoTaxon & { fadMa: number; ladMa: number }));
  }
  return out;
}

function findsOf(random: Random, units: TimescaleUnit[], taxon: DemoTaxon & { fadMa: number; ladMa: number }): DemoOccurrence[] {
  const { fadMa: fad, ladMa: lad } = taxon;
  const finds: DemoOccurrence[] = [];
  const byStage = (stage: TimescaleUnit): DemoOccurrence => ({
    taxon: taxon.name,
    higherTaxon: taxon.higherTaxon,
    maxMa: stage.base,
    minMa: stage.top,
    earlyInterval: stage.name,
    lateInterval: null,
    collection: collectionOf(random, stage),
  });
  /** A find dated by ages inside [lo, hi] and inside one stage, from 0.1 to 1.2 Myr long. */
  const byAges = (stage: TimescaleUnit, maxMa: number, minMa: number): DemoOccurrence => ({
    taxon: taxon.name,
    higherTaxon: taxon.higherTaxon,
    maxMa,
    minMa,
    earlyInterval: null,
    lateInterval: null,
    collection: collectionOf(random, stage),
  });
  const span = () => round2(0.1 + random() * 1.1);

  const first = stageOfOldest(units, fad);
  const last = stageOfYoungest(units, lad);
  // A range given as stages (first appearance on a stage's base, last on a stage's top): finds dated by stage.
  const stageCoded = taxon.fadInterval !== undefined && taxon.ladInterval !== undefined;
  if (stageCoded) {
    const from = units.indexOf(stageUnit(taxon.fadInterval!));
    const to = units.indexOf(stageUnit(taxon.ladInterval!));
    finds.push(byStage(units[from]!));
    for (let i = from + 1; i < to; i++) if (random() < DEMO_STAGE_SAMPLING[STAGES[i]!]) finds.push(byStage(units[i]!));
    if (to > from) finds.push(byStage(units[to]!));
    return finds;
  }
  // The oldest find starts at the first appearance, the youngest ends at the last; both stay inside their stage.
  finds.push(byAges(first, fad, Math.max(lad, first.top, round2(fad - span()))));
  const from = units.indexOf(first);
  const to = units.indexOf(last);
  for (let i = from + 1; i < to; i++) {
    const stage = units[i]!;
    if (random() >= DEMO_STAGE_SAMPLING[STAGES[i]!]) continue;
    if (random() < 0.3) {
      finds.push(byStage(stage));
    } else {
      const young = round2(stage.top + 0.01 + random() * (stage.base - stage.top - 0.02));
      finds.push(byAges(stage, Math.min(stage.base, round2(young + span())), young));
    }
  }
  // A second find in the first or last stage now and then, inside the range.
  if (random() < 0.4) {
    const young = Math.max(lad, first.top);
    const at = round2(young + random() * (fad - young));
    finds.push(byAges(first, Math.min(fad, round2(at + span())), at));
  }
  finds.push(byAges(last, Math.min(fad, last.base, round2(lad + span())), lad));
  return finds;
}

/** The finds as the CSV file a person would upload (header row first), e.g. to try the occurrence upload with the demo. */
export function demoOccurrenceCsv(finds: DemoOccurrence[]): string {
  const lines = ["genus,family,max_ma,min_ma,early_interval,collection"];
  for (const f of finds) {
    const dated = f.earlyInterval ? ["", "", f.earlyInterval] : [String(f.maxMa), String(f.minMa), ""];
    lines.push([f.taxon, f.higherTaxon, ...dated, f.collection].join(","));
  }
  return lines.join("\n") + "\n";
}
