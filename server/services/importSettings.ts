// A study's import settings (declared missing-value tokens), kept under `importSettings` in the
// studies.settings JSON column beside the remembered column mappings: read by every import's
// preview and commit, edited through the study's import-settings route.
import { eq, sql } from "drizzle-orm";
import type { DbOrTx } from "../db";
import { studies } from "../../db/schema/index";
import { importSettingsSchema, type ImportSettings } from "../../shared/schemas/importChecks";
import { notFound } from "../domain/errors";
import { addActivity } from "./activity";

const NONE: ImportSettings = { missingTokens: [] };

/** The study's import settings; what the column holds is parsed again, so an older or hand-edited value reads as none rather than failing an import. */
export async function loadImportSettings(db: DbOrTx, studyId: string): Promise<ImportSettings> {
  const [row] = await db.select({ settings: studies.settings }).from(studies).where(eq(studies.id, studyId));
  if (!row) throw notFound("Study not found.");
  const parsed = importSettingsSchema.safeParse((row.settings as { importSettings?: unknown }).importSettings ?? NONE);
  return parsed.success ? parsed.data : NONE;
}

/** Replaces the import settings in one statement (other settings untouched) and records it in the study's activity. */
export async function saveImportSettings(db: DbOrTx, studyId: string, userId: string, input: ImportSettings): Promise<ImportSettings> {
  const updated = await db
    .update(studies)
    .set({ settings: sql`jsonb_set(${studies.settings}, '{importSettings}', ${JSON.stringify(input)}::jsonb)` })
    .where(eq(studies.id, studyId))
    .returning({ id: studies.id });
  if (updated.length === 0) throw notFound("Study not found.");
  await addActivity(db, {
    studyId,
    userId,
    kind: "study.importSettings",
    summary: input.missingTokens.length ? `Missing-value tokens set to ${input.missingTokens.map((t) => `"${t}"`).join(", ")}` : "Missing-value tokens cleared",
    refType: null,
    refId: null,
  });
  return input;
}
