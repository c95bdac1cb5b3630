// A study's own time bins. The set is read and saved whole (one transaction replaces every row), a
// CSV file of bins is read and checked without saving anything, and other services ask for the
// study's interval lookup (its bins first, then the ICS chart) when they read interval names.
import { readFile, rm } from "node:fs/promises";
import { asc, eq } from "drizzle-orm";
import type { Database, DbOrTx } from "../db";
import { timeBins, users } from "../../db/schema/index";
import { parseCsv } from "../../shared/csv/parse";
import { csvTextProblem } from "../../shared/csv/textCheck";
import { findUnit } from "../../shared/timescale/lookup";
import { binsShadowingChart, INTERVAL_RESOLUTION_ORDER, intervalLookup, readTimeBinCsv, type IntervalLookup } from "../../shared/timebins/index";
import { TIME_BIN_CSV_MAX_BYTES, TIME_BIN_CSV_MAX_LABEL, timeBinSetSchema, type TimeBin, type TimeBinCsv, type TimeBinList, type TimeBinSetInput } from "../../shared/schemas/timeBins";
import { DomainError, invalidInput } from "../domain/errors";
import type { UploadedFile } from "./uploadLifecycle";

/** The study's bins, oldest first. */
export async function loadTimeBins(db: DbOrTx, studyId: string): Promise<TimeBin[]> {
  const rows = await db
    .select({ position: timeBins.position, name: timeBins.name, baseMa: timeBins.baseMa, topMa: timeBins.topMa, chartUnit: timeBins.chartUnit })
    .from(timeBins)
    .where(eq(timeBins.studyId, studyId))
    .orderBy(asc(timeBins.position));
  return rows;
}

/** How the study reads interval names: its bins first, then the ICS chart. */
export async function studyIntervalLookup(db: DbOrTx, studyId: string): Promise<IntervalLookup> {
  return intervalLookup(await loadTimeBins(db, studyId));
}

export function createTimeBinService(db: Database) {
  async function list(studyId: string): Promise<TimeBinList> {
    const bins = await loadTimeBins(db, studyId);
    const [last] = await db
      .select({ updatedAt: timeBins.updatedAt, updatedBy: timeBins.updatedBy, name: users.name })
      .from(timeBins)
      .leftJoin(users, eq(users.id, timeBins.updatedBy))
      .where(eq(timeBins.studyId, studyId))
      .limit(1);
    return {
      bins,
      resolutionOrder: INTERVAL_RESOLUTION_ORDER,
      shadowedChartUnits: binsShadowingChart(bins),
      updatedAt: last ? last.updatedAt.toISOString() : null,
      updatedBy: last?.updatedBy && last.name !== null ? { id: last.updatedBy, name: last.name } : null,
    };
  }

  return {
    list,

    /** Replaces the study's bins with the set given (checked by timeBinSetSchema on the way in), in one transaction. */
    async replace(studyId: string, user: { id: string }, input: TimeBinSetInput): Promise<TimeBinList> {
      // The route has parsed the body already; parsing again keeps the service safe when called from a script.
      const set = timeBinSetSchema.parse(input);
      await db.transaction(async (tx) => {
        await tx.delete(timeBins).where(eq(timeBins.studyId, studyId));
        if (set.bins.length === 0) return;
        const now = new Date();
        await tx.insert(timeBins).values(
          set.bins.map((bin, i) => ({
            studyId,
            position: i + 1,
            name: bin.name,
            baseMa: bin.baseMa,
            topMa: bin.topMa,
            // The chart's own label, however the person wrote it.
            chartUnit: bin.chartUnit ? (findUnit(bin.chartUnit)?.label ?? bin.chartUnit) : null,
            updatedBy: user.id,
            updatedAt: now,
          })),
        );
      });
      return list(studyId);
    },

    /** Reads a CSV file of bins and checks it; nothing is saved and the file is not kept. */
    async readCsv(file: UploadedFile): Promise<TimeBinCsv> {
      try {
        if (file.size > TIME_BIN_CSV_MAX_BYTES) throw new DomainError("too_large", "too_large", `The file is larger than the limit of ${TIME_BIN_CSV_MAX_LABEL} for time bins.`);
        const content = await readFile(file.path);
        const bytes = new Uint8Array(content.buffer, content.byteOffset, content.byteLength);
        const notText = csvTextProblem(bytes);
        if (notText) throw new DomainError("unsupported_media", "not_csv_text", notText, { file: notText });
        const parsed = parseCsv(bytes);
        if (parsed.header.length === 0) throw invalidInput("The file is empty: it needs a header row and a row per bin.", { file: "The file is empty" });
        if (parsed.rows.length === 0) throw invalidInput("The file has a header row but no bins.", { file: "No data rows" });
        const fileName = file.originalname.replace(/[\\/]/g, "_").slice(0, 255) || "time-bins.csv";
        return readTimeBinCsv(parsed, fileName);
      } finally {
        await rm(file.path, { force: true });
      }
    },
  };
}
