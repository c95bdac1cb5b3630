// What a thread is about, for people: the labels of its targets (a trait, a taxon, one trait value,
// an outcome override, a run or a comparison), read in one query per kind, and the coding decisions
// that concern a target (what a resolution can link). Read by the thread service.
import { and, desc, eq, inArray, or, type SQL } from "drizzle-orm";
import type { Database } from "../db";
import { codingDecisions, comparisons, outcomeOverrides, runs, taxa, traits, users } from "../../db/schema/index";
import type { TraitState } from "../../shared/codebook";
import type { DecisionBrief, ThreadTarget, ThreadTargetType } from "../../shared/schemas/threads";
import { formatMeasurement } from "../../shared/selectivity/formatNumber";

export interface TargetKey {
  type: string;
  id: string;
  traitId: string | null;
}

export const keyOf = (t: TargetKey) => `${t.type}:${t.id}:${t.traitId ?? ""}`;

const OUTCOME_WORDS: Record<string, string> = { survivor: "survivor", victim: "victim", excluded: "not at risk" };

interface TraitInfo {
  label: string;
  kind: string;
  states: TraitState[];
  unit: string | null;
}

/** A stored value for people: a state's label, a number with its unit, a range end with its interval. */
function valueText(field: string, value: unknown, trait: TraitInfo | undefined): string {
  if (value === null || value === undefined || value === "") return "";
  if (trait) {
    if (trait.kind === "numeric" && typeof value === "number") return formatMeasurement(value, trait.unit);
    const state = trait.states.find((s) => s.code === value);
    return state ? state.label : String(value);
  }
  if ((field === "fad" || field === "lad") && typeof value === "object") {
    const end = value as { ma?: number; interval?: string | null };
    const ma = typeof end.ma === "number" ? formatMeasurement(end.ma, "Ma") : "";
    return end.interval ? (ma ? `${end.interval} · ${ma}` : end.interval) : ma;
  }
  if (field === "outcome" && typeof value === "string") return OUTCOME_WORDS[value] ?? value;
  if (typeof value === "object") return JSON.stringify(value);
  return String(value);
}

const FIELD_WORDS: Record<string, string> = {
  name: "Name",
  higherTaxon: "Higher taxon",
  notes: "Notes",
  fad: "First appearance",
  lad: "Last appearance",
  outcome: "Outcome",
};

/** Labels of targets, read in one query per kind of target. */
export async function describeTargets(db: Database, studyId: string, keys: TargetKey[]): Promise<Map<string, ThreadTarget>> {
  const ids = (type: string) => [...new Set(keys.filter((k) => k.type === type).map((k) => k.id))];
  const traitIds = [...new Set([...ids("trait"), ...keys.filter((k) => k.type === "value" && k.traitId).map((k) => k.traitId!)])];
  const taxonIds = [...new Set([...ids("taxon"), ...ids("value")])];
  const [traitRows, taxonRows, overrideRows, runRows, comparisonRows] = await Promise.all([
    traitIds.length ? db.select({ id: traits.id, label: traits.label }).from(traits).where(and(eq(traits.studyId, studyId), inArray(traits.id, traitIds))) : [],
    taxonIds.length
      ? db.select({ id: taxa.id, name: taxa.name, deletedAt: taxa.deletedAt }).from(taxa).where(and(eq(taxa.studyId, studyId), inArray(taxa.id, taxonIds)))
      : [],
    ids("override").length
      ? db
          .select({ id: outcomeOverrides.id, taxonId: outcomeOverrides.taxonId, taxonName: taxa.name, outcome: outcomeOverrides.outcome, boundaryMa: outcomeOverrides.boundaryMa, revokedAt: outcomeOverrides.revokedAt })
          .from(outcomeOverrides)
          .innerJoin(taxa, eq(taxa.id, outcomeOverrides.taxonId))
          .where(and(eq(outcomeOverrides.studyId, studyId), inArray(outcomeOverrides.id, ids("override"))))
      : [],
    ids("run").length ? db.select({ id: runs.id, name: runs.name }).from(runs).where(and(eq(runs.studyId, studyId), inArray(runs.id, ids("run")))) : [],
    ids("comparison").length
      ? db.select({ id: comparisons.id, name: comparisons.name }).from(comparisons).where(and(eq(comparisons.studyId, studyId), inArray(comparisons.id, ids("comparison"))))
      : [],
  ]);
  const trait = new Map(traitRows.map((r) => [r.id, r]));
  const taxon = new Map(taxonRows.map((r) => [r.id, r]));
  const override = new Map(overrideRows.map((r) => [r.id, r]));
  const run = new Map(runRows.map((r) => [r.id, r]));
  const comparison = new Map(comparisonRows.map((r) => [r.id, r]));

  const out = new Map<string, ThreadTarget>();
  for (const key of keys) {
    const base = { type: key.type as ThreadTargetType, id: key.id, traitId: key.traitId };
    let described: ThreadTarget;
    switch (key.type) {
      case "trait": {
        const t = trait.get(key.id);
        described = { ...base, label: t ? t.label : "a trait that was deleted", taxonId: null, missing: !t };
        break;
      }
      case "taxon": {
        const t = taxon.get(key.id);
        described = { ...base, label: t ? t.name : "a taxon that was deleted", taxonId: key.id, missing: !t || t.deletedAt !== null };
        break;
      }
      case "value": {
        const t = taxon.get(key.id);
        const tr = key.traitId ? trait.get(key.traitId) : undefined;
        described = {
          ...base,
          label: `${tr ? tr.label : "a deleted trait"} of ${t ? t.name : "a deleted taxon"}`,
          taxonId: key.id,
          missing: !t || t.deletedAt !== null || !tr,
        };
        break;
      }
      case "override": {
        const o = override.get(key.id);
        const where = o?.boundaryMa === null || o?.boundaryMa === undefined ? "at any boundary" : `at ${formatMeasurement(o.boundaryMa, "Ma")}`;
        described = o
          ? { ...base, label: `Outcome of ${o.taxonName} set to ${OUTCOME_WORDS[o.outcome] ?? o.outcome} ${where}${o.revokedAt ? " (revoked)" : ""}`, taxonId: o.taxonId, missing: false }
          : { ...base, label: "an outcome override that was deleted", taxonId: null, missing: true };
        break;
      }
      case "run": {
        const r = run.get(key.id);
        described = { ...base, label: r ? `the run “${r.name}”` : "a run that was deleted", taxonId: null, missing: !r };
        break;
      }
      default: {
        const c = comparison.get(key.id);
        described = { ...base, label: c ? `the comparison “${c.name}”` : "a comparison that was deleted", taxonId: null, missing: !c };
      }
    }
    out.set(keyOf(key), described);
  }
  return out;
}

/** Coding decisions for people, by a condition on coding_decisions; newest first. */
export async function decisionBriefs(db: Database, studyId: string, where: SQL | undefined, limit: number): Promise<DecisionBrief[]> {
  const rows = await db
    .select({
      d: codingDecisions,
      taxonName: taxa.name,
      trait: { label: traits.label, kind: traits.kind, states: traits.states, unit: traits.unit },
      userName: users.name,
    })
    .from(codingDecisions)
    .leftJoin(taxa, eq(taxa.id, codingDecisions.taxonId))
    .leftJoin(traits, eq(traits.id, codingDecisions.traitId))
    .leftJoin(users, eq(users.id, codingDecisions.userId))
    .where(and(eq(codingDecisions.studyId, studyId), where))
    .orderBy(desc(codingDecisions.createdAt), desc(codingDecisions.id))
    .limit(limit);
  return rows.map(({ d, taxonName, trait, userName }) => {
    const traitInfo = d.traitId && trait?.label ? (trait as TraitInfo) : undefined;
    const of = taxonName ? ` of ${taxonName}` : "";
    const subject = traitInfo ? `${traitInfo.label}${of}` : d.field === "taxon" ? (taxonName ?? "A taxon") : `${FIELD_WORDS[d.field] ?? d.field}${of}`;
    return {
      id: d.id,
      action: d.action,
      subject,
      oldText: d.field === "taxon" ? "" : valueText(d.field, d.oldValue, traitInfo),
      newText: d.field === "taxon" ? "" : valueText(d.field, d.newValue, traitInfo),
      reason: d.reason,
      user: d.userId && userName !== null ? { id: d.userId, name: userName } : null,
      createdAt: d.createdAt.toISOString(),
    };
  });
}

/** What a resolution of a thread on this target can link: recent decisions about it. */
export async function relatedDecisions(db: Database, studyId: string, target: ThreadTarget): Promise<DecisionBrief[]> {
  switch (target.type) {
    case "value":
      // The value's own changes, and the taxon's creation (an import) or restoration that set it.
      return decisionBriefs(
        db,
        studyId,
        and(eq(codingDecisions.taxonId, target.id), or(eq(codingDecisions.traitId, target.traitId!), eq(codingDecisions.field, "taxon"))),
        10,
      );
    case "taxon":
      return decisionBriefs(db, studyId, eq(codingDecisions.taxonId, target.id), 10);
    case "trait":
      return decisionBriefs(db, studyId, eq(codingDecisions.traitId, target.id), 10);
    case "override":
      return target.taxonId ? decisionBriefs(db, studyId, and(eq(codingDecisions.taxonId, target.taxonId), eq(codingDecisions.field, "outcome")), 10) : [];
    default:
      return [];
  }
}
