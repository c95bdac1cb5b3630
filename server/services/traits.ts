// The codebook: a study's trait definitions. Changing a trait never orphans values silently: a
// change that removes states still in use is refused with the taxa that hold them until the
// request says where each removed state's values go (`remap`); applying it writes one coding
// decision per changed value, in the same transaction.
import { and, asc, eq, max, sql } from "drizzle-orm";
import type { Database, DbOrTx } from "../db";
import { traits } from "../../db/schema/index";
import { traitDefinitionProblems, type Trait, type TraitCreateInput, type TraitList, type TraitUpdateInput, type TraitUpdateResult, type TraitUsage } from "../../shared/schemas/traits";
import type { TraitKind } from "../../shared/codebook";
import { conflict, detailedError, invalidInput, notFound } from "../domain/errors";
import type { TaxonState } from "./taxonModel";
import { loadCodebook, loadTrait, toTrait } from "./codebookStore";
import { stateFromRow, writeTaxa } from "./taxaStore";
import { insertDecisions, newBatchId, recordActivity, type NewDecision } from "./decisionLog";

const SAMPLE_SIZE = 10;
const keyTaken = (key: string) => conflict(`The key "${key}" is already used by another trait of this study.`, { key: "This key is already used in this study" });
const isStateKind = (k: TraitKind) => k !== "numeric";

interface Usage {
  code: string | number;
  count: number;
  sample: Array<{ id: string; name: string; value: string | number }>;
}

/** Taxa holding each value of a trait matching `where` (on `v`, the value as JSON): counts and a sample by name. */
async function valueUsage(db: DbOrTx, studyId: string, traitId: string, where: ReturnType<typeof sql>, groupByValue: boolean): Promise<Usage[]> {
  const res = await db.execute(sql`
    WITH held AS (
      SELECT t.id, t.name, t.trait_values -> ${traitId} AS v FROM taxa t
      WHERE t.study_id = ${studyId} AND t.deleted_at IS NULL AND t.trait_values ? ${traitId}
    ), hit AS (SELECT * FROM held WHERE ${where}),
    ranked AS (SELECT hit.*, row_number() OVER (PARTITION BY ${groupByValue ? sql`v` : sql`1`} ORDER BY name) AS rn, count(*) OVER (PARTITION BY ${groupByValue ? sql`v` : sql`1`}) AS n FROM hit)
    SELECT id, name, v, n::int AS n FROM ranked WHERE rn <= ${SAMPLE_SIZE} ORDER BY v, name`);
  const groups = new Map<string, Usage>();
  for (const r of res.rows as Array<{ id: string; name: string; v: string | number; n: number }>) {
    const key = groupByValue ? JSON.stringify(r.v) : "all";
    const g = groups.get(key) ?? { code: r.v, count: r.n, sample: [] };
    g.sample.push({ id: r.id, name: r.name, value: r.v });
    groups.set(key, g);
  }
  return [...groups.values()];
}

export function createTraitService(db: Database) {
  async function lockTrait(tx: DbOrTx, studyId: string, traitId: string) {
    const res = await tx.execute(sql`SELECT id FROM traits WHERE id = ${traitId} AND study_id = ${studyId} FOR UPDATE`);
    if (res.rows.length === 0) throw notFound("Trait not found in this study.");
    return (await loadTrait(tx, studyId, traitId))!;
  }

  return {
    async list(studyId: string): Promise<TraitList> {
      return { traits: await loadCodebook(db, studyId) };
    },

    async create(studyId: string, input: TraitCreateInput): Promise<Trait> {
      return db.transaction(async (tx) => {
        const [taken] = await tx.select({ id: traits.id }).from(traits).where(and(eq(traits.studyId, studyId), eq(traits.key, input.key)));
        if (taken) throw keyTaken(input.key);
        const [{ last }] = await tx.select({ last: max(traits.sortOrder) }).from(traits).where(eq(traits.studyId, studyId));
        const [row] = await tx
          .insert(traits)
          .values({
            studyId,
            key: input.key,
            label: input.label,
            kind: input.kind,
            aspect: input.aspect ?? "ecology",
            states: (input.states ?? []).map((s, order) => ({ code: s.code, label: s.label, order })),
            unit: input.unit ?? null,
            transform: input.transform ?? "none",
            minValue: input.minValue ?? null,
            maxValue: input.maxValue ?? null,
            codingRule: input.codingRule ?? "",
            sortOrder: (last ?? -1) + 1,
          })
          .returning();
        return toTrait(row);
      });
    },

    async update(studyId: string, traitId: string, user: { id: string }, input: TraitUpdateInput): Promise<TraitUpdateResult> {
      return db.transaction(async (tx) => {
        const before = await lockTrait(tx, studyId, traitId);
        const merged = {
          kind: input.kind ?? before.kind,
          states: input.states ? input.states.map((s, order) => ({ code: s.code, label: s.label, order })) : before.states,
          unit: input.unit !== undefined ? input.unit : before.unit,
          transform: input.transform ?? before.transform,
          minValue: input.minValue !== undefined ? input.minValue : before.minValue,
          maxValue: input.maxValue !== undefined ? input.maxValue : before.maxValue,
        };
        // Leaving the numeric kind drops the unit, transform and bounds unless new ones are given.
        if (input.kind && !isStateKind(before.kind) && isStateKind(input.kind)) {
          if (input.unit === undefined) merged.unit = null;
          if (input.transform === undefined) merged.transform = "none";
          if (input.minValue === undefined) merged.minValue = null;
          if (input.maxValue === undefined) merged.maxValue = null;
        }
        if (input.kind === "numeric" && input.states === undefined) merged.states = [];
        const problems = traitDefinitionProblems(merged);
        if (problems.length) {
          const fields = Object.fromEntries(problems.map((p) => [p.path.join("."), p.message]));
          throw invalidInput(`Invalid trait: ${problems.map((p) => p.message).join("; ")}`, fields);
        }
        if (input.key && input.key !== before.key) {
          const [taken] = await tx.select({ id: traits.id }).from(traits).where(and(eq(traits.studyId, studyId), eq(traits.key, input.key)));
          if (taken) throw keyTaken(input.key);
        }

        // Which held values the new definition no longer accepts.
        let remapped = 0;
        let batchId: string | null = null;
        const label = input.label ?? before.label;
        if (!isStateKind(before.kind) && isStateKind(merged.kind)) {
          const held = await valueUsage(tx, studyId, traitId, sql`true`, false);
          if (held.length) {
            throw detailedError("conflict", "kind_in_use", `${held[0].count} taxa hold a number for ${label}; clear those values (or define a new trait) before making it ${merged.kind}.`, {
              affected: held.map((h) => ({ code: null, label: "numbers", count: h.count, sample: h.sample })),
            });
          }
        } else if (isStateKind(before.kind)) {
          const newCodes = new Set(isStateKind(merged.kind) ? merged.states.map((s) => s.code) : []);
          const heldCodes = await valueUsage(tx, studyId, traitId, sql`true`, true);
          const orphaned = heldCodes.filter((u) => !newCodes.has(String(u.code)));
          const remap = input.remap ?? {};
          const remapProblems: Record<string, string> = {};
          for (const [from, to] of Object.entries(remap)) {
            if (to !== null && !newCodes.has(to)) remapProblems[`remap.${from}`] = `"${to}" is not a state of the changed trait`;
          }
          if (Object.keys(remapProblems).length) throw invalidInput(`Invalid remap: ${Object.values(remapProblems).join("; ")}`, remapProblems);
          const unmapped = orphaned.filter((u) => !(String(u.code) in remap));
          if (unmapped.length) {
            const stateLabel = (code: string) => before.states.find((s) => s.code === code)?.label ?? "";
            throw detailedError("conflict",
              "states_in_use",
              `Taxa hold states this change removes (${unmapped.map((u) => `${u.code}: ${u.count}`).join(", ")}). Say where their values go with remap, e.g. { "${unmapped[0].code}": "<new code>" } or null to clear.`,
              { affected: unmapped.map((u) => ({ code: String(u.code), label: stateLabel(String(u.code)), count: u.count, sample: u.sample })) },
            );
          }
          const moving = orphaned.filter((u) => String(u.code) in remap);
          if (moving.length) {
            const codes = moving.map((u) => String(u.code));
            const res = await tx.execute(sql`
              SELECT t.id, t.name, t.higher_taxon, t.fad_ma, t.fad_interval, t.lad_ma, t.lad_interval, t.notes, t.trait_values, t.version, t.updated_at, t.deleted_at
              FROM taxa t WHERE t.study_id = ${studyId} AND t.deleted_at IS NULL
                AND t.trait_values ->> ${traitId} IN (SELECT jsonb_array_elements_text(${JSON.stringify(codes)}::jsonb))
              ORDER BY t.id FOR UPDATE`);
            const states: TaxonState[] = res.rows.map(stateFromRow);
            batchId = newBatchId();
            const decisions: NewDecision[] = [];
            for (const s of states) {
              const from = s.traitValues[traitId] as string;
              const to = remap[from];
              const values = { ...s.traitValues };
              if (to === null) delete values[traitId];
              else values[traitId] = to;
              s.traitValues = values;
              const reason =
                input.reason ||
                (to === null ? `Codebook change: state "${from}" of ${label} removed; value cleared` : `Codebook change: state "${from}" of ${label} mapped to "${to}"`);
              decisions.push({ taxonId: s.id, traitId, field: traitId, action: "update", oldValue: from, newValue: to, reason, batchId });
            }
            await writeTaxa(tx, states, user.id);
            await insertDecisions(tx, studyId, user.id, decisions);
            remapped = states.length;
            await recordActivity(tx, {
              studyId,
              userId: user.id,
              kind: "codebook.remapped",
              summary: `Changed the states of ${label}: ${remapped} values moved (${moving.map((u) => `${u.code} -> ${remap[String(u.code)] ?? "empty"}`).join(", ")})`,
              refType: "batch",
              refId: batchId,
            });
          }
        } else if (merged.kind === "numeric") {
          const lo = merged.minValue;
          const hi = merged.maxValue;
          const outside = await valueUsage(
            tx,
            studyId,
            traitId,
            sql`jsonb_typeof(v) <> 'number' ${lo !== null ? sql`OR (v #>> '{}')::float8 < ${lo}` : sql``} ${hi !== null ? sql`OR (v #>> '{}')::float8 > ${hi}` : sql``}
                ${merged.transform === "log10" ? sql`OR (v #>> '{}')::float8 <= 0` : sql``}`,
            false,
          );
          if (outside.length) {
            throw detailedError("conflict", "values_out_of_range", `${outside[0].count} taxa hold values of ${label} that the new minimum, maximum or transform refuses; correct them first.`, {
              affected: outside.map((h) => ({ code: null, label: "values out of range", count: h.count, sample: h.sample })),
            });
          }
        }

        const retiredAt = input.retired === undefined ? undefined : input.retired ? (before.retiredAt ? new Date(before.retiredAt) : new Date()) : null;
        const [row] = await tx
          .update(traits)
          .set({
            key: input.key,
            label: input.label,
            aspect: input.aspect,
            codingRule: input.codingRule,
            kind: merged.kind,
            states: merged.states,
            unit: merged.unit,
            transform: merged.transform,
            minValue: merged.minValue,
            maxValue: merged.maxValue,
            retiredAt,
            updatedAt: new Date(),
          })
          .where(eq(traits.id, traitId))
          .returning();
        return { trait: toTrait(row), remapped, batchId };
      });
    },

    async reorder(studyId: string, traitIds: string[]): Promise<TraitList> {
      return db.transaction(async (tx) => {
        const current = await tx.select({ id: traits.id }).from(traits).where(eq(traits.studyId, studyId)).orderBy(asc(traits.sortOrder)).for("update");
        const known = new Set(current.map((t) => t.id));
        const given = new Set(traitIds);
        const missing = current.filter((t) => !given.has(t.id)).length;
        const unknown = traitIds.filter((id) => !known.has(id));
        if (unknown.length || missing || given.size !== traitIds.length) {
          throw invalidInput("traitIds must list every trait of the study exactly once, in the new order (retired ones too).", {
            traitIds: unknown.length ? `${unknown.length} ids are not traits of this study` : missing ? `${missing} traits of the study are missing` : "A trait is listed twice",
          });
        }
        await tx.execute(sql`
          UPDATE traits SET sort_order = o.ord - 1, updated_at = now()
          FROM jsonb_array_elements_text(${JSON.stringify(traitIds)}::jsonb) WITH ORDINALITY AS o(id, ord)
          WHERE traits.id = o.id::uuid AND traits.study_id = ${studyId}`);
        return { traits: await loadCodebook(tx, studyId) };
      });
    },

    async usage(studyId: string, traitId: string): Promise<TraitUsage> {
      const trait = await loadTrait(db, studyId, traitId);
      if (!trait) throw notFound("Trait not found in this study.");
      const [counts] = (
        await db.execute(sql`
          SELECT count(*)::int AS taxa, count(*) FILTER (WHERE trait_values ? ${traitId})::int AS held,
                 min((trait_values ->> ${traitId})::float8) FILTER (WHERE jsonb_typeof(trait_values -> ${traitId}) = 'number') AS lo,
                 max((trait_values ->> ${traitId})::float8) FILTER (WHERE jsonb_typeof(trait_values -> ${traitId}) = 'number') AS hi
          FROM taxa WHERE study_id = ${studyId} AND deleted_at IS NULL`)
      ).rows as Array<{ taxa: number; held: number; lo: number | null; hi: number | null }>;
      if (trait.kind === "numeric") {
        return { traitId, taxaCount: counts.taxa, valueCount: counts.held, byState: [], numeric: { min: counts.lo, max: counts.hi } };
      }
      const usage = await valueUsage(db, studyId, traitId, sql`true`, true);
      const byCode = new Map(usage.map((u) => [String(u.code), u]));
      const byState = trait.states.map((s) => ({ code: s.code, label: s.label, count: byCode.get(s.code)?.count ?? 0, sample: (byCode.get(s.code)?.sample ?? []).map(({ id, name }) => ({ id, name })) }));
      for (const u of usage) {
        if (!trait.states.some((s) => s.code === String(u.code))) byState.push({ code: String(u.code), label: "", count: u.count, sample: u.sample.map(({ id, name }) => ({ id, name })) });
      }
      return { traitId, taxaCount: counts.taxa, valueCount: counts.held, byState, numeric: null };
    },
  };
}
export type TraitService = ReturnType<typeof createTraitService>;
