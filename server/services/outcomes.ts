// Survivors, victims and taxa not at risk across a boundary; outcome overrides (coding decisions);
// rates through time. Reads ranges with Drizzle and hands plain arrays to the pure functions in
// shared/outcomes and shared/stats.
import { randomUUID } from "node:crypto";
import { and, asc, count, desc, eq, inArray, isNotNull, isNull, sql, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import type { Database, DbOrTx, Transaction } from "../db";
import { codingDecisions, outcomeOverrides, taxa, users } from "../../db/schema/index";
import { classifyAcrossBoundary, outcomeWarnings, rangeProblem, ratesThroughTime, type BoundaryOutcome, type WarningGroup } from "../../shared/outcomes/index";
import { wilsonInterval } from "../../shared/stats/index";
import { defaultWindowBelow, findUnit, RANK_ORDER, TIMESCALE_VERSION, timescaleStages, timescaleUnits } from "../../shared/timescale/index";
import {
  BOUNDARY_OUTCOMES,
  MASS_EXTINCTION_TEACHING_THRESHOLD,
  type OutcomeOverride,
  type OutcomeTaxon,
  type OutcomesResult,
  type RatesResult,
} from "../../shared/schemas/outcomes";
import { conflict, DomainError, invalidInput } from "../domain/errors";

/** Two boundary ages closer than this (Myr, about nine hours) are the same boundary. */
const SAME_BOUNDARY_TOLERANCE = 1e-9;
/** Names listed beside each warning's count. */
const WARNING_SAMPLE_SIZE = 20;
/** Unknown names reported one by one in `fields` when a bulk request is refused. */
const MAX_REPORTED_ROWS = 1000;

const STAGE_INTERVALS = timescaleStages.map((s) => ({ name: s.name, base: s.base, top: s.top }));
const STAGES_OLDEST_FIRST = [...timescaleStages].reverse();

const WARNING_NOTES = {
  singleInterval:
    "Survivors and victims whose whole known range lies within one stage. Their outcome may rest on a single sample, and such taxa are especially sensitive to how well that stage is preserved and how long it lasted (Foote 2000).",
  lastSeenBelowBoundary:
    "Victims last seen below the boundary, inside the window. Because the fossil record is incomplete, a last find falls before the true extinction (Signor & Lipps 1982): some of these taxa may have lived up to the boundary, which makes an abrupt loss look gradual; others may truly have died out earlier. A shorter window leaves them out.",
  missingRange:
    "First or last appearance missing: these taxa cannot be classified and count as not at risk until their range is entered or their outcome is set by hand.",
  invalidRange:
    "Range unusable (a negative age, or a first appearance younger than the last): these taxa count as not at risk until the range is corrected.",
} as const;

const WILSON_METHOD = "Wilson score interval (Wilson 1927) for victims / (victims + survivors)";
const RATES_METHOD =
  "Boundary-crosser counts and per-capita rates (Foote 2000, Paleobiology 26(4) suppl.): q = -ln(nbt / (nbt + nbL)) per stage, divided by the stage's duration for a rate per Myr. Ranges are range-through; overrides do not change rates.";
const THRESHOLD_NOTE =
  "A loss of more than about 30% of taxa is a common teaching threshold for calling an event a mass extinction (common practice, no source). Such thresholds are conventions, not natural breaks: read the bars against the whole record.";

interface SessionPerson {
  id: string;
}

interface TaxonRange {
  id: string;
  name: string;
  higherTaxon: string;
  fadMa: number | null;
  ladMa: number | null;
}

/** A taxon's final outcome across a boundary (overrides applied), for analyses that read every taxon. */
export interface ClassifiedTaxon {
  taxonId: string;
  name: string;
  higherTaxon: string;
  outcome: BoundaryOutcome;
}

type ActiveOverride = Pick<typeof outcomeOverrides.$inferSelect, "id" | "taxonId" | "boundaryMa" | "outcome" | "reason" | "source">;

function sameBoundary(a: number | null, b: number | null): boolean {
  if (a === null || b === null) return a === b;
  return Math.abs(a - b) <= SAME_BOUNDARY_TOLERANCE;
}

/** For each taxon, the override that applies at `boundary`: one set for this boundary wins over one set for any boundary; the newest wins among equals. */
function overridesAt(active: ActiveOverride[], boundary: number): Map<string, ActiveOverride> {
  const specific = new Map<string, ActiveOverride>();
  const general = new Map<string, ActiveOverride>();
  for (const o of active) {
    // `active` is oldest first, so a later row replaces an earlier one.
    if (o.boundaryMa === null) general.set(o.taxonId, o);
    else if (sameBoundary(o.boundaryMa, boundary)) specific.set(o.taxonId, o);
  }
  for (const [taxonId, o] of specific) general.set(taxonId, o);
  return general;
}

function warningOf(group: WarningGroup, rows: TaxonRange[], note: string) {
  return { count: group.count, sample: group.indices.slice(0, WARNING_SAMPLE_SIZE).map((i) => rows[i].name), note };
}

const boundarySql = (boundaryMa: number | null): SQL =>
  boundaryMa === null
    ? isNull(outcomeOverrides.boundaryMa)
    : sql`abs(${outcomeOverrides.boundaryMa} - ${boundaryMa}) <= ${SAME_BOUNDARY_TOLERANCE}`;

export function createOutcomeService(db: Database) {
  const creator = alias(users, "override_creator");
  const revoker = alias(users, "override_revoker");

  async function loadRanges(studyId: string): Promise<TaxonRange[]> {
    return db
      .select({ id: taxa.id, name: taxa.name, higherTaxon: taxa.higherTaxon, fadMa: taxa.fadMa, ladMa: taxa.ladMa })
      .from(taxa)
      .where(and(eq(taxa.studyId, studyId), isNull(taxa.deletedAt)))
      .orderBy(asc(taxa.name));
  }

  /** Overrides on one page, with who set and revoked them and the reason given at revocation. */
  async function describeOverrides(tx: DbOrTx, where: SQL, page?: { limit: number; offset: number }): Promise<OutcomeOverride[]> {
    const base = tx
      .select({ o: outcomeOverrides, taxonName: taxa.name, creatorName: creator.name, revokerName: revoker.name })
      .from(outcomeOverrides)
      .innerJoin(taxa, eq(taxa.id, outcomeOverrides.taxonId))
      .leftJoin(creator, eq(creator.id, outcomeOverrides.createdBy))
      .leftJoin(revoker, eq(revoker.id, outcomeOverrides.revokedBy))
      .where(where)
      .orderBy(desc(outcomeOverrides.createdAt), desc(outcomeOverrides.id));
    const rows = page ? await base.limit(page.limit).offset(page.offset) : await base;
    const revoked = rows.filter((r) => r.o.revokedAt);
    const revokedIds = revoked.map((r) => r.o.id);
    const revokeReasons = new Map<string, string>();
    if (revokedIds.length) {
      // Narrowed by taxon first (indexed), then matched on the override id kept in the decision's old value.
      const overrideIdSql = sql<string>`${codingDecisions.oldValue}->>'overrideId'`;
      const decisions = await tx
        .select({ overrideId: overrideIdSql, reason: codingDecisions.reason })
        .from(codingDecisions)
        .where(
          and(
            inArray(codingDecisions.taxonId, [...new Set(revoked.map((r) => r.o.taxonId))]),
            eq(codingDecisions.field, "outcome"),
            eq(codingDecisions.action, "revert"),
            inArray(overrideIdSql, revokedIds),
          ),
        );
      for (const d of decisions) revokeReasons.set(d.overrideId, d.reason);
    }
    return rows.map(({ o, taxonName, creatorName, revokerName }) => ({
      id: o.id,
      taxonId: o.taxonId,
      taxonName,
      outcome: o.outcome as BoundaryOutcome,
      boundaryMa: o.boundaryMa,
      reason: o.reason,
      source: o.source as "manual" | "import",
      active: o.revokedAt === null,
      createdAt: o.createdAt.toISOString(),
      createdBy: o.createdBy ? { id: o.createdBy, name: creatorName ?? "" } : null,
      revokedAt: o.revokedAt ? o.revokedAt.toISOString() : null,
      revokedBy: o.revokedBy ? { id: o.revokedBy, name: revokerName ?? "" } : null,
      revokeReason: o.revokedAt ? (revokeReasons.get(o.id) ?? null) : null,
    }));
  }

  // Override writes of one study run one at a time, so two people replacing the same taxon's
  // override cannot both see it active and leave two active overrides behind.
  async function lockStudyOverrides(tx: Transaction, studyId: string): Promise<void> {
    await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtext(${"outcome_overrides:" + studyId}))`);
  }

  /**
   * Revokes the given active overrides, each with a 'revert' coding decision pointing at the decision
   * that set it. A few statements however many rows (the rows travel as one JSON parameter), so that a
   * large imported column is replaced quickly; no statement joins on a JSON field.
   */
  async function revokeRows(tx: Transaction, studyId: string, rows: ActiveOverride[], user: SessionPerson, reason: string, batchId: string): Promise<void> {
    if (!rows.length) return;
    const ids = JSON.stringify(rows.map((r) => r.id));
    // The decisions that set these overrides. Matching them by the JSON field in SQL can turn into a
    // nested loop (rows x decisions) on a large column, so they are read by taxon (few rows) or all at
    // once for the study (many rows) and matched here.
    const fewRows = rows.length <= 100;
    const taxonIds = `{${[...new Set(rows.map((r) => r.taxonId))].join(",")}}`;
    const setDecisions = await tx.execute<{ id: string; overrideId: string }>(sql`
      SELECT id, new_value->>'overrideId' AS "overrideId" FROM coding_decisions
      WHERE study_id = ${studyId}::uuid AND field = 'outcome' AND action = 'override'
        ${fewRows ? sql`AND taxon_id = ANY(${taxonIds}::uuid[])` : sql``}
    `);
    const setDecisionOf = new Map(setDecisions.rows.map((d) => [d.overrideId, d.id]));
    const decisions = rows.map((r) => ({
      taxonId: r.taxonId,
      revertsId: setDecisionOf.get(r.id) ?? null,
      oldValue: { overrideId: r.id, outcome: r.outcome, boundaryMa: r.boundaryMa, source: r.source },
    }));
    await tx.execute(sql`
      UPDATE outcome_overrides SET revoked_at = now(), revoked_by = ${user.id}::uuid
      WHERE study_id = ${studyId}::uuid AND id IN (SELECT jsonb_array_elements_text(${ids}::jsonb)::uuid)
    `);
    await tx.execute(sql`
      INSERT INTO coding_decisions (study_id, taxon_id, field, action, old_value, new_value, reason, user_id, reverts_id, batch_id)
      SELECT ${studyId}::uuid, d."taxonId", 'outcome', 'revert', d."oldValue", NULL, ${reason}::text, ${user.id}::uuid, d."revertsId", ${batchId}::uuid
      FROM jsonb_to_recordset(${JSON.stringify(decisions)}::jsonb) AS d("taxonId" uuid, "revertsId" uuid, "oldValue" jsonb)
    `);
  }

  /** Active overrides of these taxa set for exactly this boundary (or, for null, for any boundary). */
  async function activeMatching(tx: Transaction, studyId: string, taxonIds: Set<string>, boundaryMa: number | null): Promise<ActiveOverride[]> {
    const rows = await tx
      .select({
        id: outcomeOverrides.id,
        taxonId: outcomeOverrides.taxonId,
        boundaryMa: outcomeOverrides.boundaryMa,
        outcome: outcomeOverrides.outcome,
        reason: outcomeOverrides.reason,
        source: outcomeOverrides.source,
      })
      .from(outcomeOverrides)
      .where(and(eq(outcomeOverrides.studyId, studyId), isNull(outcomeOverrides.revokedAt), boundarySql(boundaryMa)));
    return rows.filter((r) => taxonIds.has(r.taxonId));
  }

  /** Writes new overrides (replacing active ones of the same taxa and boundary) and their coding decisions. */
  async function writeOverrides(
    tx: Transaction,
    studyId: string,
    user: SessionPerson,
    input: { boundaryMa: number | null; reason: string; source: "manual" | "import"; items: Array<{ taxonId: string; outcome: BoundaryOutcome }> },
  ): Promise<{ created: Array<{ id: string; taxonId: string }>; replaced: ActiveOverride[]; batchId: string }> {
    const batchId = randomUUID();
    const replaced = await activeMatching(tx, studyId, new Set(input.items.map((i) => i.taxonId)), input.boundaryMa);
    await revokeRows(tx, studyId, replaced, user, `Replaced by a newer override: ${input.reason}`, batchId);
    const replacedByTaxon = new Map(replaced.map((r) => [r.taxonId, r]));
    // Ids are made here so that the overrides and their decisions are written from the same rows, with no join.
    const items = input.items.map((i) => {
      const previous = replacedByTaxon.get(i.taxonId);
      return {
        id: randomUUID(),
        taxonId: i.taxonId,
        outcome: i.outcome,
        previous: previous ? { overrideId: previous.id, outcome: previous.outcome, boundaryMa: previous.boundaryMa, source: previous.source } : null,
      };
    });
    const itemsJson = JSON.stringify(items);
    await tx.execute(sql`
      INSERT INTO outcome_overrides (id, study_id, taxon_id, boundary_ma, outcome, reason, source, created_by)
      SELECT i.id, ${studyId}::uuid, i."taxonId", ${input.boundaryMa}::double precision, i.outcome, ${input.reason}::text, ${input.source}::text, ${user.id}::uuid
      FROM jsonb_to_recordset(${itemsJson}::jsonb) AS i(id uuid, "taxonId" uuid, outcome text)
    `);
    await tx.execute(sql`
      INSERT INTO coding_decisions (study_id, taxon_id, field, action, old_value, new_value, reason, user_id, batch_id)
      SELECT ${studyId}::uuid, i."taxonId", 'outcome', 'override', i.previous,
        jsonb_build_object('overrideId', i.id, 'outcome', i.outcome, 'boundaryMa', ${input.boundaryMa}::double precision, 'source', ${input.source}::text),
        ${input.reason}::text, ${user.id}::uuid, ${batchId}::uuid
      FROM jsonb_to_recordset(${itemsJson}::jsonb) AS i(id uuid, "taxonId" uuid, outcome text, previous jsonb)
    `);
    const created = items.map((i) => ({ id: i.id, taxonId: i.taxonId }));
    return { created, replaced, batchId };
  }

  return {
    /** Survivors, victims and taxa not at risk across a boundary, after overrides, with warnings and one page of each list. */
    async outcomes(
      studyId: string,
      query: { boundary?: number; boundaryUnit?: string; window?: number; group?: BoundaryOutcome; page: number; pageSize: number },
      everyTaxon?: (taxa: ClassifiedTaxon[]) => void,
    ): Promise<OutcomesResult> {
      let boundary: number;
      if (query.boundaryUnit !== undefined) {
        const unit = findUnit(query.boundaryUnit);
        if (!unit) throw invalidInput(`"${query.boundaryUnit}" is not a unit of the time scale.`, { boundaryUnit: "Not a unit of the time scale" });
        boundary = unit.base;
      } else if (query.boundary !== undefined) {
        boundary = query.boundary;
      } else {
        throw invalidInput("Choose a boundary: give boundary (an age in Ma) or boundaryUnit.", { boundary: "Required" });
      }

      let window = query.window;
      let windowDefaultFrom: OutcomesResult["windowDefaultFrom"] = null;
      if (window === undefined) {
        const fallback = defaultWindowBelow(boundary);
        if (!fallback) {
          const oldest = STAGES_OLDEST_FIRST[0];
          throw invalidInput(
            `No stage of the time scale lies just below ${boundary} Ma (the oldest stage, the ${oldest.label}, begins at ${oldest.base} Ma), so there is no default window: give a window in Myr.`,
            { window: "Give a window in Myr: there is no stage below this boundary" },
          );
        }
        // Down to the base of the stage the boundary falls in: a custom age inside a stage does not reach past it.
        const { stage } = fallback;
        window = fallback.windowMyr;
        windowDefaultFrom = { name: stage.name, label: stage.label, base: stage.base, top: stage.top, duration: stage.duration, wholeStage: fallback.wholeStage };
      }

      const rows = await loadRanges(studyId);
      const activeRows = await db
        .select({
          id: outcomeOverrides.id,
          taxonId: outcomeOverrides.taxonId,
          boundaryMa: outcomeOverrides.boundaryMa,
          outcome: outcomeOverrides.outcome,
          reason: outcomeOverrides.reason,
          source: outcomeOverrides.source,
        })
        .from(outcomeOverrides)
        .where(and(eq(outcomeOverrides.studyId, studyId), isNull(outcomeOverrides.revokedAt)))
        .orderBy(asc(outcomeOverrides.createdAt), asc(outcomeOverrides.id));
      const overrideOf = overridesAt(activeRows, boundary);

      // Ranges that cannot be used are not at risk (and are listed in the warnings); the rest are classified.
      const ranges = rows.map((r) => ({ fad: r.fadMa, lad: r.ladMa }));
      const problems = ranges.map((r) => rangeProblem(r));
      const usable = rows.flatMap((_, i) => (problems[i] ? [] : [i]));
      const computed: BoundaryOutcome[] = rows.map(() => "excluded");
      classifyAcrossBoundary(
        usable.map((i) => ranges[i] as { fad: number; lad: number }),
        boundary,
        window,
      ).forEach((outcome, k) => (computed[usable[k]] = outcome));
      const warnings = outcomeWarnings(ranges, boundary, window, STAGE_INTERVALS);

      const flagsOf = rows.map(() => [] as OutcomeTaxon["flags"]);
      for (const flag of ["singleInterval", "lastSeenBelowBoundary", "missingRange", "invalidRange"] as const) {
        for (const i of warnings[flag].indices) flagsOf[i].push(flag);
      }

      const emptyCounts = () => ({ survivor: 0, victim: 0, excluded: 0, total: rows.length });
      const counts = emptyCounts();
      const computedCounts = emptyCounts();
      const members: Record<BoundaryOutcome, number[]> = { survivor: [], victim: [], excluded: [] };
      const finalOutcome: BoundaryOutcome[] = computed.map((c, i) => {
        const final = (overrideOf.get(rows[i].id)?.outcome as BoundaryOutcome | undefined) ?? c;
        computedCounts[c]++;
        counts[final]++;
        members[final].push(i);
        return final;
      });
      everyTaxon?.(rows.map((r, i) => ({ taxonId: r.id, name: r.name, higherTaxon: r.higherTaxon, outcome: finalOutcome[i] })));

      const toItem = (i: number): OutcomeTaxon => {
        const o = overrideOf.get(rows[i].id);
        return {
          taxonId: rows[i].id,
          name: rows[i].name,
          higherTaxon: rows[i].higherTaxon,
          fad: rows[i].fadMa,
          lad: rows[i].ladMa,
          computedOutcome: computed[i],
          outcome: finalOutcome[i],
          override: o ? { id: o.id, outcome: o.outcome as BoundaryOutcome, boundaryMa: o.boundaryMa, reason: o.reason, source: o.source as "manual" | "import" } : null,
          rangeProblem: problems[i]?.message ?? null,
          flags: flagsOf[i],
        };
      };
      const lists: OutcomesResult["lists"] = {};
      for (const group of query.group ? [query.group] : BOUNDARY_OUTCOMES) {
        const start = (query.page - 1) * query.pageSize;
        lists[group] = {
          total: members[group].length,
          page: query.page,
          pageSize: query.pageSize,
          items: members[group].slice(start, start + query.pageSize).map(toItem),
        };
      }

      const atRisk = counts.victim + counts.survivor;
      const level = 0.95;
      return {
        boundary,
        boundaryUnits: timescaleUnits
          .filter((u) => sameBoundary(u.base, boundary))
          .sort((a, b) => RANK_ORDER.indexOf(a.rank) - RANK_ORDER.indexOf(b.rank))
          .map((u) => ({ name: u.name, label: u.label, rank: u.rank })),
        window,
        windowDefaultFrom,
        timescaleVersion: TIMESCALE_VERSION,
        counts,
        computedCounts,
        overridesApplied: rows.filter((r) => overrideOf.has(r.id)).length,
        proportionalExtinction: {
          victims: counts.victim,
          atRisk,
          value: atRisk > 0 ? counts.victim / atRisk : null,
          ci: atRisk > 0 ? wilsonInterval(counts.victim, atRisk, { level }) : null,
          level,
          method: WILSON_METHOD,
        },
        warnings: {
          singleInterval: warningOf(warnings.singleInterval, rows, WARNING_NOTES.singleInterval),
          lastSeenBelowBoundary: warningOf(warnings.lastSeenBelowBoundary, rows, WARNING_NOTES.lastSeenBelowBoundary),
          missingRange: warningOf(warnings.missingRange, rows, WARNING_NOTES.missingRange),
          invalidRange: warningOf(warnings.invalidRange, rows, WARNING_NOTES.invalidRange),
        },
        lists,
      };
    },

    /** The summary of `outcomes` (one taxon per list) and every taxon's final outcome, sorted by name. */
    async finalOutcomes(studyId: string, query: { boundary: number; window?: number }): Promise<{ summary: OutcomesResult; taxa: ClassifiedTaxon[] }> {
      let taxa: ClassifiedTaxon[] = [];
      const summary = await this.outcomes(studyId, { ...query, page: 1, pageSize: 1 }, (all) => (taxa = all));
      return { summary, taxa };
    },

    /** Per-stage boundary-crosser counts and rates over the stages the study's ranges reach, oldest first. */
    async rates(studyId: string): Promise<RatesResult> {
      const rows = await db
        .select({ fad: taxa.fadMa, lad: taxa.ladMa })
        .from(taxa)
        .where(and(eq(taxa.studyId, studyId), isNull(taxa.deletedAt)));
      const usable: Array<{ fad: number; lad: number }> = [];
      const leftOut = { missingRange: 0, invalidRange: 0 };
      for (const r of rows) {
        const problem = rangeProblem(r);
        if (!problem) usable.push(r as { fad: number; lad: number });
        else if (problem.kind === "missing") leftOut.missingRange++;
        else leftOut.invalidRange++;
      }
      const threshold = { proportion: MASS_EXTINCTION_TEACHING_THRESHOLD, note: THRESHOLD_NOTE };
      const result = { timescaleVersion: TIMESCALE_VERSION, method: RATES_METHOD, taxaUsed: usable.length, leftOut, threshold };
      if (!usable.length) return { ...result, stages: [] };

      let oldest = -Infinity;
      let youngest = Infinity;
      for (const r of usable) {
        if (r.fad > oldest) oldest = r.fad;
        if (r.lad < youngest) youngest = r.lad;
      }
      const candidates = STAGES_OLDEST_FIRST.filter((s) => s.base >= youngest && s.top <= oldest);
      const rates = ratesThroughTime(usable, candidates.map((s) => ({ name: s.name, base: s.base, top: s.top })));
      // Keep the run from the first to the last stage holding a taxon; empty stages between them stay.
      const first = rates.findIndex((r) => r.taxonCount > 0);
      const last = rates.findLastIndex((r) => r.taxonCount > 0);
      const spanned = first < 0 ? [] : rates.slice(first, last + 1);
      return {
        ...result,
        stages: spanned.map((r, k) => ({
          name: r.name,
          label: candidates[first + k].label,
          base: r.base,
          top: r.top,
          duration: candidates[first + k].duration,
          nbt: r.nbt,
          nbL: r.nbL,
          nFt: r.nFt,
          nFL: r.nFL,
          taxonCount: r.taxonCount,
          q: r.q,
          qPerMyr: r.qPerMyr,
          p: r.p,
          pPerMyr: r.pPerMyr,
          proportionalExtinction: r.proportionalExtinction,
          proportionalOrigination: r.proportionalOrigination,
        })),
      };
    },

    async listOverrides(studyId: string, query: { status: "active" | "revoked" | "all"; page: number; pageSize: number }) {
      const conditions = [eq(outcomeOverrides.studyId, studyId)];
      if (query.status === "active") conditions.push(isNull(outcomeOverrides.revokedAt));
      if (query.status === "revoked") conditions.push(isNotNull(outcomeOverrides.revokedAt));
      const where = and(...conditions)!;
      const [{ total }] = await db.select({ total: count() }).from(outcomeOverrides).where(where);
      const overrides = await describeOverrides(db, where, { limit: query.pageSize, offset: (query.page - 1) * query.pageSize });
      return { total, page: query.page, pageSize: query.pageSize, overrides };
    },

    /** Sets one taxon's outcome by hand; an active override of the same taxon and boundary is revoked and replaced. */
    async createOverride(studyId: string, user: SessionPerson, input: { taxonId: string; outcome: BoundaryOutcome; boundaryMa: number | null; reason: string }) {
      return db.transaction(async (tx) => {
        await lockStudyOverrides(tx, studyId);
        const [taxon] = await tx
          .select({ id: taxa.id })
          .from(taxa)
          .where(and(eq(taxa.id, input.taxonId), eq(taxa.studyId, studyId), isNull(taxa.deletedAt)));
        if (!taxon) throw new DomainError("not_found", "not_found", "This study has no such taxon (it may have been deleted).", { taxonId: "No such taxon in this study" });
        const { created, replaced } = await writeOverrides(tx, studyId, user, {
          boundaryMa: input.boundaryMa,
          reason: input.reason,
          source: "manual",
          items: [{ taxonId: taxon.id, outcome: input.outcome }],
        });
        const [override] = await describeOverrides(tx, eq(outcomeOverrides.id, created[0].id));
        return { override, replacedOverrideId: replaced[0]?.id ?? null };
      });
    },

    /** Revokes an override: the taxon's outcome falls back to the computed one (or to an override set for any boundary). */
    async revokeOverride(studyId: string, overrideId: string, user: SessionPerson, reason: string): Promise<OutcomeOverride> {
      return db.transaction(async (tx) => {
        await lockStudyOverrides(tx, studyId);
        const [row] = await tx
          .select()
          .from(outcomeOverrides)
          .where(and(eq(outcomeOverrides.id, overrideId), eq(outcomeOverrides.studyId, studyId)));
        if (!row) throw new DomainError("not_found", "not_found", "This study has no such override.");
        if (row.revokedAt) throw conflict(`This override was already revoked on ${row.revokedAt.toISOString().slice(0, 10)}.`);
        await revokeRows(tx, studyId, [row], user, reason, randomUUID());
        const [override] = await describeOverrides(tx, eq(outcomeOverrides.id, row.id));
        return override;
      });
    },

    /**
     * Applies an imported outcome column: one override per row, in one transaction. Refuses the whole
     * column, naming each row, when a name is not a taxon of the study or appears twice.
     */
    async bulkOverride(
      studyId: string,
      user: SessionPerson,
      input: { boundaryMa: number | null; reason: string; items: Array<{ taxonName: string; outcome: BoundaryOutcome }> },
    ) {
      return db.transaction(async (tx) => {
        await lockStudyOverrides(tx, studyId);
        const known = await tx
          .select({ id: taxa.id, name: taxa.name })
          .from(taxa)
          .where(and(eq(taxa.studyId, studyId), isNull(taxa.deletedAt)));
        const idByName = new Map(known.map((t) => [t.name, t.id]));
        const rowOfName = new Map<string, number>();
        const fields: Record<string, string> = {};
        const badRows: number[] = [];
        input.items.forEach((item, i) => {
          const id = idByName.get(item.taxonName);
          const earlier = rowOfName.get(item.taxonName);
          let problem: string | null = null;
          if (!id) problem = `Row ${i + 1}: this study has no taxon named "${item.taxonName}"`;
          else if (earlier !== undefined) problem = `Row ${i + 1}: "${item.taxonName}" is also on row ${earlier + 1}; give each taxon once`;
          else rowOfName.set(item.taxonName, i);
          if (problem) {
            badRows.push(i + 1);
            if (badRows.length <= MAX_REPORTED_ROWS) fields[`items.${i}.taxonName`] = problem;
          }
        });
        if (badRows.length) {
          const shown = badRows.slice(0, 10).join(", ");
          throw invalidInput(
            `${badRows.length} row${badRows.length === 1 ? "" : "s"} of the outcome column name no taxon of this study, or name one twice ` +
              `(row${badRows.length === 1 ? "" : "s"} ${shown}${badRows.length > 10 ? ", ..." : ""}). Nothing was applied.`,
            fields,
          );
        }
        const { created, replaced, batchId } = await writeOverrides(tx, studyId, user, {
          boundaryMa: input.boundaryMa,
          reason: input.reason,
          source: "import",
          items: input.items.map((item) => ({ taxonId: idByName.get(item.taxonName)!, outcome: item.outcome })),
        });
        return { created: created.length, replaced: replaced.length, batchId };
      });
    },
  };
}
export type OutcomeService = ReturnType<typeof createOutcomeService>;
