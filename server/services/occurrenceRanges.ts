// Ranges derived from the study's occurrences (shared/occurrences deriveRanges), previewed against the
// trait table (old -> new, new names, taxa without finds) and applied as coding decisions whose reason
// names the uploads, all in one batch so one batch revert undoes them.
import { and, eq, sql } from "drizzle-orm";
import type { Database, DbOrTx } from "../db";
import { imports } from "../../db/schema/index";
import { deriveRanges } from "../../shared/occurrences/index";
import type { RangeDerivation, RangesApplyResult, RangesPreview } from "../../shared/schemas/occurrences";
import { invalidInput } from "../domain/errors";
import { loadStudyOccurrences } from "./occurrenceFinds";
import { OCCURRENCE_UPLOAD } from "./occurrenceUploads";
import { fieldValue, newTaxonState, setField, type TaxonState } from "./taxonModel";
import { insertTaxaWithDecisions, isUniqueViolation, nameTakenMeanwhile, taxaByName, writeTaxa } from "./taxaStore";
import { insertDecisions, newBatchId, recordActivity, type NewDecision } from "./decisionLog";

/** The committed occurrence uploads of the study, oldest first. */
function committedUploads(tx: DbOrTx, studyId: string) {
  return tx
    .select({ id: imports.id, fileName: imports.fileName })
    .from(imports)
    .where(and(eq(imports.studyId, studyId), eq(imports.target, OCCURRENCE_UPLOAD.target), eq(imports.status, "committed")))
    .orderBy(imports.committedAt);
}

/** Derived ranges of the study against its trait table. */
async function planRanges(tx: DbOrTx, studyId: string, opts: RangeDerivation) {
  const occurrences = await loadStudyOccurrences(tx, studyId);
  const { ranges, dropped } = deriveRanges(occurrences, { ageMode: opts.ageMode, maxSpanMyr: opts.maxSpanMyr ?? undefined });
  const live = await tx.execute(sql`SELECT id, name, fad_ma, lad_ma FROM taxa WHERE study_id = ${studyId} AND deleted_at IS NULL`);
  const table = new Map((live.rows as Array<{ id: string; name: string; fad_ma: number | null; lad_ma: number | null }>).map((r) => [r.name, r]));
  const derivedNames = new Set(ranges.map((r) => r.taxon));
  return { occurrences, ranges, dropped, table, derivedNames };
}

/** What applying derived ranges would change: old -> new per taxon, new names, table taxa without occurrences. */
export async function previewRanges(db: Database, studyId: string, opts: RangeDerivation): Promise<RangesPreview> {
  const plan = await planRanges(db, studyId, opts);
  const changes: RangesPreview["changes"] = [];
  const newTaxa: RangesPreview["newTaxa"] = [];
  let unchanged = 0;
  for (const range of plan.ranges) {
    const row = plan.table.get(range.taxon);
    if (!row) newTaxa.push(range);
    else if (row.fad_ma === range.fadMa && row.lad_ma === range.ladMa) unchanged++;
    else changes.push({ ...range, taxonId: row.id, oldFadMa: row.fad_ma, oldLadMa: row.lad_ma });
  }
  const withoutOccurrences = [...plan.table.values()]
    .filter((r) => !plan.derivedNames.has(r.name))
    .sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0))
    .map((r) => ({ taxonId: r.id, name: r.name, fadMa: r.fad_ma, ladMa: r.lad_ma }));
  return {
    changes,
    newTaxa,
    unchanged,
    withoutOccurrences,
    dropped: { count: plan.dropped.length, reasons: plan.dropped.slice(0, 20).map((d) => d.reason) },
    occurrenceCount: plan.occurrences.length,
    uploads: await committedUploads(db, studyId),
  };
}

/**
 * Applies the derived ranges of the chosen names in one transaction: a taxon of the table gets its first and
 * last appearance as update decisions, a new name becomes a taxon (a create decision). Every decision's
 * reason names the uploads; all share one batch id, so one batch revert undoes the lot.
 */
export async function applyRanges(db: Database, studyId: string, user: { id: string }, input: RangeDerivation & { taxa: string[]; reason: string }): Promise<RangesApplyResult> {
  try {
    return await db.transaction(async (tx) => {
      const plan = await planRanges(tx, studyId, input);
      const byName = new Map(plan.ranges.map((r) => [r.taxon, r]));
      const chosen = [...new Set(input.taxa.map((t) => t.trim()))];
      const unknown = chosen.filter((name) => !byName.has(name));
      if (unknown.length) {
        throw invalidInput(`No occurrences derive a range for ${unknown.length} chosen name(s), e.g. "${unknown[0]}"; preview again.`, { taxa: `Unknown: ${unknown.slice(0, 5).join(", ")}` });
      }
      const uploads = await committedUploads(tx, studyId);
      const settings = `${input.ageMode === "midpoint" ? "midpoints of the dates" : "widest range the dates allow"}${input.maxSpanMyr !== null ? `, finds dated more coarsely than ${input.maxSpanMyr} Myr left out` : ""}`;
      const reason = `Range derived from occurrences (${settings}) of ${uploads.map((u) => `upload "${u.fileName}" (${u.id})`).join(", ")}` + (input.reason ? `: ${input.reason}` : "");
      const batchId = newBatchId();
      const existing = new Map((await taxaByName(tx, studyId, chosen, true)).map((s) => [s.name, s]));
      const created: TaxonState[] = [];
      const updated: TaxonState[] = [];
      const decisions: NewDecision[] = [];
      let unchanged = 0;
      for (const name of chosen) {
        const range = byName.get(name)!;
        const fad = { ma: range.fadMa, interval: null };
        const lad = { ma: range.ladMa, interval: null };
        const state = existing.get(name);
        if (!state) {
          const s = newTaxonState(name, range.higherTaxon ?? "");
          setField(s, "fad", fad);
          setField(s, "lad", lad);
          created.push(s);
          continue;
        }
        let changed = false;
        for (const [field, to] of [
          ["fad", fad],
          ["lad", lad],
        ] as const) {
          const from = fieldValue(state, field) as { ma: number; interval: string | null } | null;
          if (from && from.ma === to.ma && from.interval === null) continue;
          decisions.push({ taxonId: state.id, field, action: "update", oldValue: from, newValue: to, reason, batchId });
          setField(state, field, to);
          changed = true;
        }
        if (changed) updated.push(state);
        else unchanged++;
      }
      await insertTaxaWithDecisions(tx, studyId, created, user.id, { reason, importId: null, batchId });
      await writeTaxa(tx, updated, user.id);
      await insertDecisions(tx, studyId, user.id, decisions);
      await recordActivity(tx, {
        studyId,
        userId: user.id,
        kind: "ranges.derived",
        summary: `Ranges from occurrences: ${updated.length} taxa changed, ${created.length} added`,
        refType: "batch",
        refId: batchId,
      });
      return { batchId, changed: updated.length, created: created.length, unchanged, reason };
    });
  } catch (err) {
    if (isUniqueViolation(err)) throw nameTakenMeanwhile();
    throw err;
  }
}
