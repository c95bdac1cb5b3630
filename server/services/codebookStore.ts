// The study's codebook as the services read it: its traits in codebook order, retired ones flagged.
import { and, asc, eq } from "drizzle-orm";
import type { DbOrTx } from "../db";
import { traits } from "../../db/schema/index";
import type { CodebookTrait } from "../../shared/csv/values";
import type { Trait } from "../../shared/schemas/traits";

export type CodebookEntry = CodebookTrait & { sortOrder: number };

export function toTrait(row: typeof traits.$inferSelect): Trait {
  return {
    id: row.id,
    key: row.key,
    label: row.label,
    kind: row.kind,
    aspect: row.aspect,
    states: [...row.states].sort((a, b) => a.order - b.order),
    unit: row.unit,
    transform: row.transform,
    minValue: row.minValue,
    maxValue: row.maxValue,
    codingRule: row.codingRule,
    sortOrder: row.sortOrder,
    retired: row.retiredAt !== null,
    retiredAt: row.retiredAt?.toISOString() ?? null,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

/** The study's traits in codebook order, retired ones flagged. */
export async function loadCodebook(db: DbOrTx, studyId: string): Promise<Trait[]> {
  const rows = await db.select().from(traits).where(eq(traits.studyId, studyId)).orderBy(asc(traits.sortOrder), asc(traits.createdAt));
  return rows.map(toTrait);
}

/** The study's codebook keyed by trait id. */
export async function loadCodebookById(db: DbOrTx, studyId: string): Promise<Map<string, Trait>> {
  return new Map((await loadCodebook(db, studyId)).map((t) => [t.id, t]));
}

export async function loadTrait(db: DbOrTx, studyId: string, traitId: string): Promise<Trait | null> {
  const [row] = await db.select().from(traits).where(and(eq(traits.studyId, studyId), eq(traits.id, traitId)));
  return row ? toTrait(row) : null;
}

export type { CodebookTrait };
