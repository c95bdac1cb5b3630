// The life of an uploaded CSV file, one for every kind: a trait table, an occurrence table, a modern
// list (an `imports` row whose target names the kind).
// - Upload: multer streamed the file into UPLOAD_DIR; it is read and refused (and removed) when it is
//   not a CSV table, else kept (mode 600) as the upload's stored file, with status "previewed".
// - Preview: the stored file is read again through a mapping; the counts land on the row.
// - Commit: the upload is claimed ("committing") under an advisory lock held for the whole writing
//   transaction; progress is written outside that transaction so the client can poll it. The row
//   says "committed" inside the transaction and the file is deleted after it. A commit that fails
//   goes back to "previewed" with the reason and keeps its file for another try (choosing to skip
//   invalid rows, say); when its file is gone it cannot be tried again and is discarded.
// - Discard deletes the file. The sweeps (every process, every IMPORT_SWEEP_EVERY_MS, and the stale
//   one at every upload of any kind): a "committing" upload whose lock is free was interrupted
//   (PostgreSQL released the lock and rolled its writing back) and is put back; an upload left
//   uncommitted for a day is discarded and its file deleted.
import { chmod, readFile, rm } from "node:fs/promises";
import { and, count, desc, eq, lt, sql, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import type { Database, Transaction } from "../db";
import { imports, users } from "../../db/schema/index";
import { parseCsv, type CsvDelimiter, type ParsedCsv } from "../../shared/csv/parse";
import { csvTextProblem } from "../../shared/csv/textCheck";
import { IMPORT_MAX_BYTES, type ImportSummary } from "../../shared/schemas/imports";
import { DomainError, invalidInput, notFound } from "../domain/errors";
import { RepeatingTask } from "../jobs/repeatingTask";
import { recordActivity } from "./decisionLog";

export type UploadRow = typeof imports.$inferSelect;
export type UploadTarget = "taxa" | "occurrences" | "modern";

/** A file multer wrote into UPLOAD_DIR for this request. */
export interface UploadedFile {
  originalname: string;
  /** Where the file waits; the lifecycle keeps it (as the upload's stored file) or removes it. */
  path: string;
  size: number;
}

/** What imports.mapping holds: the file's shape, and the mapping last previewed or committed. */
export interface StoredUploadInfo<Mapping> {
  columns: string[];
  delimiter: CsvDelimiter;
  mapping?: Mapping;
}

/** What differs between the kinds of upload: their limit and their words. */
export interface UploadKind {
  target: UploadTarget;
  maxBytes: number;
  tooLarge: string;
  /** The refusals of a file without a header row, and of one without data rows. */
  empty: string;
  noRows: string;
  defaultFileName: string;
  notFound: string;
  /** The conflict code, and why an upload that is no longer "previewed" cannot be used. */
  closedCode: string;
  committingNow: string;
  alreadyDone: (status: string) => string;
  /** The failure reason of a commit that failed for no reason of the domain's. */
  commitFailed: string;
  /** What the messages call an upload of this kind ("import", "upload"). */
  noun: string;
}

/** The refusals of a table of the 50 MB limit (trait tables, occurrence tables). */
export const TABLE_UPLOAD_REFUSALS = {
  maxBytes: IMPORT_MAX_BYTES,
  tooLarge: "The file is larger than the upload limit of 50 MB.",
  empty: "The file is empty: it needs a header row and at least one row of data.",
  noRows: "The file has a header row but no data rows.",
} as const;

/** What a commit's work wrote, for the upload row and the study's activity. */
export interface CommitOutcome<Result> {
  result: Result;
  mapping: unknown;
  counts: { rowCount: number; validCount: number; errorCount: number; createdCount: number; updatedCount?: number; skippedInvalid: number };
  activity: { kind: string; summary: string; refType: string; refId: string };
}

/** How often each process sweeps interrupted commits and stale uploads. */
export const IMPORT_SWEEP_EVERY_MS = 30_000;
/** An upload neither committed nor discarded within this time is discarded and its file deleted. */
export const STALE_UPLOAD_MS = 24 * 3600 * 1000;
export const INTERRUPTED_COMMIT =
  "Interrupted: the process writing this import stopped before it finished, and nothing was written. Commit again to import the file.";
const STALE_REASON = "Not committed within a day; the upload was discarded.";
/** First half of the commit lock's key (the second is a hash of the upload id), so it meets no other advisory lock. */
const COMMIT_LOCK_SPACE = 0x1a9c0e;
const commitLockKey = (uploadId: string) => sql`${COMMIT_LOCK_SPACE}::int4, hashtext(${uploadId}::text)`;
/** Progress is written when it moved by at least this much. */
const PROGRESS_STEP = 0.01;

/** Runs `work` with the uploaded file; when it fails, the file is removed before the error goes on. */
export async function removingOnFailure<T>(file: UploadedFile, work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (err) {
    await rm(file.path, { force: true });
    throw err;
  }
}

/** An upload's stored file, parsed again with the separator found at upload; 409 when the file is no longer kept. */
export async function readStoredUpload(row: Pick<UploadRow, "storedPath" | "mapping">): Promise<ParsedCsv> {
  const gone = () => new DomainError("conflict", "file_gone", "The uploaded file is no longer kept; upload it again.");
  if (!row.storedPath) throw gone();
  let bytes: Buffer;
  try {
    bytes = await readFile(row.storedPath);
  } catch {
    throw gone();
  }
  const { delimiter } = row.mapping as unknown as StoredUploadInfo<unknown>;
  return parseCsv(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), { delimiter });
}

/** 400 naming every field of the mapping that has a problem (as mapping.<field>). */
export function refuseMappingProblems(problems: Record<string, string>): void {
  if (Object.keys(problems).length) {
    throw invalidInput(`Invalid mapping: ${Object.values(problems).join("; ")}`, Object.fromEntries(Object.entries(problems).map(([k, v]) => [`mapping.${k}`, v])));
  }
}

/** Rows of the file shown at upload. */
const SAMPLE_ROWS = 10;

/** The file as read at upload: its columns, how it was read, and its first rows. */
export const fileAsRead = (parsed: ParsedCsv) => ({
  columns: parsed.header,
  delimiter: parsed.delimiter,
  encoding: parsed.encoding,
  hadBom: parsed.hadBom,
  rowCount: parsed.rows.length,
  sampleRows: parsed.rows.slice(0, SAMPLE_ROWS).map((r) => r.cells),
});

/** The stored info of an upload with the mapping that was used. */
export const withMapping = (row: UploadRow, mapping: unknown) => ({ ...(row.mapping as unknown as StoredUploadInfo<unknown>), mapping }) as never;

const creatorAlias = alias(users, "upload_creator");
const reverterAlias = alias(users, "upload_reverter");

function toSummary(i: UploadRow, creatorName: string | null, reverterName: string | null): ImportSummary {
  return {
    id: i.id,
    fileName: i.fileName,
    status: i.status as ImportSummary["status"],
    progress: i.status === "committed" || i.status === "reverted" ? 1 : i.progress,
    rowCount: i.rowCount,
    validCount: i.validCount,
    errorCount: i.errorCount,
    createdCount: i.createdCount,
    updatedCount: i.updatedCount,
    skippedInvalid: i.skippedInvalid,
    failureReason: i.failureReason,
    createdBy: i.createdBy ? { id: i.createdBy, name: creatorName ?? "" } : null,
    createdAt: i.createdAt.toISOString(),
    committedAt: i.committedAt?.toISOString() ?? null,
    revertedAt: i.revertedAt?.toISOString() ?? null,
    revertedBy: i.revertedBy ? { id: i.revertedBy, name: reverterName ?? "" } : null,
  };
}

/** Discards uploads of every kind left uncommitted for a day and deletes their files; returns their ids. */
async function sweepStaleUploads(db: Database): Promise<string[]> {
  const stale = await db
    .select({ id: imports.id, storedPath: imports.storedPath })
    .from(imports)
    .where(and(eq(imports.status, "previewed"), lt(imports.createdAt, new Date(Date.now() - STALE_UPLOAD_MS))));
  const swept: string[] = [];
  for (const row of stale) {
    const [discarded] = await db
      .update(imports)
      .set({ status: "discarded", storedPath: null, failureReason: STALE_REASON })
      .where(and(eq(imports.id, row.id), eq(imports.status, "previewed")))
      .returning({ id: imports.id });
    if (!discarded) continue;
    if (row.storedPath) await rm(row.storedPath, { force: true });
    swept.push(row.id);
  }
  return swept;
}

/**
 * Puts back uploads of every kind left "committing" by a process that stopped mid-commit (their
 * commit lock is free), with the reason, so they can be committed again; returns their ids.
 */
async function sweepInterrupted(db: Database): Promise<string[]> {
  const committing = await db.select({ id: imports.id }).from(imports).where(eq(imports.status, "committing"));
  const swept: string[] = [];
  for (const { id } of committing) {
    const put = await db.transaction(async (tx) => {
      const lock = await tx.execute(sql`SELECT pg_try_advisory_xact_lock(${commitLockKey(id)}) AS free`);
      if (!(lock.rows[0] as { free: boolean }).free) return false; // still being committed
      const back = await tx
        .update(imports)
        .set({ status: "previewed", progress: 0, failureReason: INTERRUPTED_COMMIT })
        .where(and(eq(imports.id, id), eq(imports.status, "committing")))
        .returning({ id: imports.id });
      return back.length > 0;
    });
    if (put) swept.push(id);
  }
  return swept;
}

/** The sweeps of every kind of upload, run now and every IMPORT_SWEEP_EVERY_MS in each process. */
export function createUploadSweeps(db: Database) {
  const sweepAll = async () => ({ interrupted: await sweepInterrupted(db), stale: await sweepStaleUploads(db) });
  const sweeper = new RepeatingTask("upload sweep", sweepAll, IMPORT_SWEEP_EVERY_MS);
  return {
    sweepInterrupted: () => sweepInterrupted(db),
    sweepStaleUploads: () => sweepStaleUploads(db),
    /** Both sweeps once. */
    sweep: sweepAll,
    startSweeping: () => sweeper.start({ now: true }),
    stopSweeping: () => sweeper.stop(),
  };
}
export type UploadSweeps = ReturnType<typeof createUploadSweeps>;

/** The lifecycle of one kind of upload. */
export function createUploadLifecycle(db: Database, kind: UploadKind) {
  const ofStudy = (studyId: string) => and(eq(imports.studyId, studyId), eq(imports.target, kind.target));
  const byId = (studyId: string, uploadId: string) => and(eq(imports.id, uploadId), ofStudy(studyId));

  async function row(studyId: string, uploadId: string): Promise<UploadRow> {
    const [found] = await db.select().from(imports).where(byId(studyId, uploadId));
    if (!found) throw notFound(kind.notFound);
    return found;
  }

  const closed = (r: UploadRow) =>
    new DomainError(
      "conflict",
      kind.closedCode,
      r.status === "committing" ? kind.committingNow : r.status === "discarded" ? "This upload was discarded; upload the file again." : kind.alreadyDone(r.status),
    );

  /** The upload, refused (409) unless it still waits for its commit. */
  async function openRow(studyId: string, uploadId: string): Promise<UploadRow> {
    const found = await row(studyId, uploadId);
    if (found.status !== "previewed") throw closed(found);
    return found;
  }

  const summariesWhere = (where: SQL | undefined) =>
    db
      .select({ i: imports, creatorName: creatorAlias.name, reverterName: reverterAlias.name })
      .from(imports)
      .leftJoin(creatorAlias, eq(creatorAlias.id, imports.createdBy))
      .leftJoin(reverterAlias, eq(reverterAlias.id, imports.revertedBy))
      .where(where)
      .orderBy(desc(imports.createdAt))
      .$dynamic();

  async function summary(studyId: string, uploadId: string): Promise<ImportSummary> {
    const [found] = await summariesWhere(byId(studyId, uploadId));
    if (!found) throw notFound(kind.notFound);
    return toSummary(found.i, found.creatorName, found.reverterName);
  }

  /** The study's uploads of this kind, newest first, and how many there are. */
  async function summaries(studyId: string, page: { limit: number; offset: number }): Promise<{ rows: ImportSummary[]; total: number }> {
    const [rows, [{ total }]] = await Promise.all([
      summariesWhere(ofStudy(studyId)).limit(page.limit).offset(page.offset),
      db.select({ total: count() }).from(imports).where(ofStudy(studyId)),
    ]);
    return { rows: rows.map((r) => toSummary(r.i, r.creatorName, r.reverterName)), total };
  }

  /**
   * Reads the file multer stored and keeps it as the upload's file, or removes it when anything
   * fails (no file without its upload row). Stale uploads of every kind are swept first.
   */
  function receive(studyId: string, user: { id: string }, file: UploadedFile): Promise<{ id: string; parsed: ParsedCsv; fileName: string }> {
    return removingOnFailure(file, async () => {
      if (file.size > kind.maxBytes) throw new DomainError("too_large", "too_large", kind.tooLarge);
      const content = await readFile(file.path);
      const bytes = new Uint8Array(content.buffer, content.byteOffset, content.byteLength);
      const notText = csvTextProblem(bytes);
      if (notText) throw new DomainError("unsupported_media", "not_csv_text", notText, { file: notText });
      const parsed = parseCsv(bytes);
      if (parsed.header.length === 0) throw invalidInput(kind.empty, { file: "The file is empty" });
      if (parsed.rows.length === 0) throw invalidInput(kind.noRows, { file: "No data rows" });
      await sweepStaleUploads(db);
      await chmod(file.path, 0o600);
      const info: StoredUploadInfo<never> = { columns: parsed.header, delimiter: parsed.delimiter };
      const fileName = file.originalname.replace(/[\\/]/g, "_").slice(0, 255) || kind.defaultFileName;
      const [inserted] = await db
        .insert(imports)
        .values({ studyId, target: kind.target, fileName, storedPath: file.path, status: "previewed", mapping: info as never, rowCount: parsed.rows.length, createdBy: user.id })
        .returning({ id: imports.id });
      return { id: inserted!.id, parsed, fileName };
    });
  }

  /** Keeps the mapping previewed and what it found, on the upload. */
  async function recordPreview(upload: UploadRow, mapping: unknown, counts: { rowCount: number; validCount: number; errorCount: number }): Promise<void> {
    await db
      .update(imports)
      .set({ mapping: withMapping(upload, mapping), ...counts })
      .where(eq(imports.id, upload.id));
  }

  /**
   * Claims the upload and runs `work` in one transaction holding the commit lock; `work` reports
   * progress (0..1), written outside the transaction. On success the upload is committed with the
   * outcome's counts and activity, and its file deleted. On failure the upload goes back with the
   * reason (`failure` may translate an error that is not a DomainError) and the error goes on.
   */
  async function commit<Result>(
    studyId: string,
    uploadId: string,
    user: { id: string },
    work: (tx: Transaction, upload: UploadRow, progress: (fraction: number) => Promise<void>) => Promise<CommitOutcome<Result>>,
    failure?: (err: unknown) => DomainError | undefined,
  ): Promise<Result> {
    // Set by the claim below: only a claimed upload is put back when the commit fails.
    let claimed: UploadRow | undefined;
    let lastReported = 0;
    const progress = async (fraction: number) => {
      if (fraction - lastReported < PROGRESS_STEP && fraction < 1) return;
      lastReported = fraction;
      await db.update(imports).set({ progress: Math.min(0.99, fraction) }).where(eq(imports.id, uploadId));
    };
    try {
      const result = await db.transaction(async (tx) => {
        // The lock comes before the claim, so a claimed upload's lock is held until this transaction ends.
        await tx.execute(sql`SELECT pg_advisory_xact_lock(${commitLockKey(uploadId)})`);
        // Claimed outside this transaction, so pollers see it and two commits of one upload cannot both run.
        const [upload] = await db
          .update(imports)
          .set({ status: "committing", progress: 0, failureReason: null })
          .where(and(byId(studyId, uploadId), eq(imports.status, "previewed")))
          .returning();
        if (!upload) throw closed(await row(studyId, uploadId));
        claimed = upload;
        const outcome = await work(tx, upload, progress);
        await tx
          .update(imports)
          .set({ status: "committed", progress: 1, mapping: withMapping(upload, outcome.mapping), ...outcome.counts, storedPath: null, committedAt: new Date() })
          .where(eq(imports.id, uploadId));
        await recordActivity(tx, { studyId, userId: user.id, ...outcome.activity });
        return outcome.result;
      });
      if (claimed?.storedPath) await rm(claimed.storedPath, { force: true });
      return result;
    } catch (err) {
      if (!claimed) throw err;
      const refusal = err instanceof DomainError ? err : failure?.(err);
      const reason = refusal?.message ?? kind.commitFailed;
      if (refusal?.code === "file_gone") {
        // Nothing can commit this upload any more: it is discarded, as the stale sweep would.
        await db.update(imports).set({ status: "discarded", progress: 0, storedPath: null, failureReason: reason }).where(eq(imports.id, uploadId));
      } else {
        await db.update(imports).set({ status: "previewed", progress: 0, failureReason: reason }).where(eq(imports.id, uploadId));
      }
      throw refusal ?? err;
    }
  }

  /** Drops an upload that was never committed, and its stored file. */
  async function discard(studyId: string, uploadId: string): Promise<void> {
    const found = await openRow(studyId, uploadId);
    await db.update(imports).set({ status: "discarded", storedPath: null }).where(and(eq(imports.id, uploadId), eq(imports.status, "previewed")));
    if (found.storedPath) await rm(found.storedPath, { force: true });
  }

  /**
   * Locks a committed upload for its revert (409 unless committed) and runs `work` in that
   * transaction; the upload is then marked reverted by the user.
   */
  async function revert<Result>(studyId: string, uploadId: string, user: { id: string }, work: (tx: Transaction, upload: { fileName: string }) => Promise<Result>): Promise<Result> {
    return db.transaction(async (tx) => {
      const locked = await tx.execute(sql`SELECT status, file_name FROM imports WHERE id = ${uploadId} AND study_id = ${studyId} AND target = ${kind.target} FOR UPDATE`);
      const current = locked.rows[0] as { status: string; file_name: string } | undefined;
      if (!current) throw notFound(kind.notFound);
      if (current.status !== "committed") {
        throw new DomainError("conflict", "not_committed", current.status === "reverted" ? `This ${kind.noun} was already reverted.` : `Only a committed ${kind.noun} can be reverted.`);
      }
      const result = await work(tx, { fileName: current.file_name });
      await tx.update(imports).set({ status: "reverted", revertedAt: new Date(), revertedBy: user.id }).where(eq(imports.id, uploadId));
      return result;
    });
  }

  return { row, openRow, summary, summaries, receive, recordPreview, commit, discard, revert };
}
export type UploadLifecycle = ReturnType<typeof createUploadLifecycle>;
