// The audit trail: coding decisions (bulk inserts, who last set each field) and the study's activity feed.
import { randomUUID } from "node:crypto";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "../db";
import { activity } from "../../db/schema/index";
import { WRITE_CHUNK } from "./sqlHelpers";

export interface NewDecision {
  taxonId: string | null;
  traitId?: string | null;
  field: string;
  action: string;
  oldValue: unknown;
  newValue: unknown;
  reason: string;
  importId?: string | null;
  revertsId?: string | null;
  batchId?: string | null;
}

/**
 * Inserts coding decisions of one study and user. Each row takes the clock time of its insert,
 * so decisions written by one transaction still sort in the order they were made.
 */
export async function insertDecisions(tx: DbOrTx, studyId: string, userId: string | null, rows: NewDecision[], onChunk?: (done: number) => Promise<void>): Promise<void> {
  for (let i = 0; i < rows.length; i += WRITE_CHUNK) {
    const chunk = rows.slice(i, i + WRITE_CHUNK).map((d) => ({
      taxon_id: d.taxonId,
      trait_id: d.traitId ?? null,
      field: d.field,
      action: d.action,
      old_value: d.oldValue ?? null,
      new_value: d.newValue ?? null,
      reason: d.reason,
      import_id: d.importId ?? null,
      reverts_id: d.revertsId ?? null,
      batch_id: d.batchId ?? null,
    }));
    await tx.execute(sql`
      INSERT INTO coding_decisions (study_id, taxon_id, trait_id, field, action, old_value, new_value, reason, user_id, import_id, reverts_id, batch_id, created_at)
      SELECT ${studyId}, u.taxon_id, u.trait_id, u.field, u.action, u.old_value, u.new_value, u.reason, ${userId}, u.import_id, u.reverts_id, u.batch_id, clock_timestamp()
      FROM jsonb_to_recordset(${JSON.stringify(chunk)}::jsonb)
        AS u(taxon_id uuid, trait_id uuid, field text, action text, old_value jsonb, new_value jsonb, reason text, import_id uuid, reverts_id uuid, batch_id uuid)`);
    await onChunk?.(chunk.length);
  }
}

export interface LastSetter {
  user: { id: string; name: string } | null;
  at: string | null;
  reason: string | null;
}

/**
 * Who last set each (taxon, field), from the audit trail: the newest decision of that field or
 * of the whole taxon (a create or restore sets every field); for the field "taxon", the newest
 * decision about the taxon at all.
 */
export async function lastSetters(db: DbOrTx, pairs: Array<{ taxonId: string; field: string }>): Promise<Map<string, LastSetter>> {
  const out = new Map<string, LastSetter>();
  if (pairs.length === 0) return out;
  const res = await db.execute(sql`
    SELECT DISTINCT ON (p.taxon_id, p.field) p.taxon_id, p.field, d.user_id, u.name AS user_name, d.created_at, d.reason
    FROM jsonb_to_recordset(${JSON.stringify(pairs.map((p) => ({ taxon_id: p.taxonId, field: p.field })))}::jsonb) AS p(taxon_id uuid, field text)
    JOIN coding_decisions d ON d.taxon_id = p.taxon_id AND (d.field = p.field OR d.field = 'taxon' OR p.field = 'taxon')
    LEFT JOIN users u ON u.id = d.user_id
    ORDER BY p.taxon_id, p.field, d.created_at DESC`);
  for (const r of res.rows as Array<Record<string, unknown>>) {
    out.set(`${r.taxon_id}|${r.field}`, {
      user: r.user_id ? { id: r.user_id as string, name: (r.user_name as string) ?? "" } : null,
      at: r.created_at ? new Date(r.created_at as string).toISOString() : null,
      reason: (r.reason as string) ?? null,
    });
  }
  return out;
}

export async function recordActivity(
  tx: DbOrTx,
  entry: { studyId: string; userId: string | null; kind: string; summary: string; refType: string; refId: string },
): Promise<void> {
  await tx.insert(activity).values(entry);
}

export const newBatchId = () => randomUUID();
