// Saved selectivity analyses. A run is created in the request (status queued) and computed as a job
// by whichever app process takes it (runJob.ts): the job reads what the run analyses (runData.ts),
// analyses it (runAnalysis.ts) and stores the results. This service starts, lists, retries, re-runs
// and compares runs; the preview is runPreview.ts and the comparison shared/runs/compareRuns.ts.
import { and, count, desc, eq, getTableColumns, sql } from "drizzle-orm";
import type { Database } from "../db";
import { APP_VERSION } from "../config";
import { activity, runs, users } from "../../db/schema/index";
import { runParamsSchema, type RunParams } from "../../shared/schemas/runParams";
import type { Run, RunList, RunPreview, RunResults, RunSummary } from "../../shared/schemas/runs";
import type { RunDiff } from "../../shared/schemas/runDiff";
import { compareRuns } from "../../shared/runs/compareRuns";
import { conflict, notFound } from "../domain/errors";
import { checkWindows, traitSpecs, type RunDataSources } from "./runData";
import { createRunJob, type RunRuntime } from "./runJob";
import { previewRun } from "./runPreview";

interface Person {
  id: string;
}

type RunRow = typeof runs.$inferSelect;

const iso = (d: Date | null) => (d ? d.toISOString() : null);

function toSummary(row: Omit<RunRow, "results">, creatorName: string | null): RunSummary {
  return {
    id: row.id,
    studyId: row.studyId,
    name: row.name,
    status: row.status as RunSummary["status"],
    progress: row.progress,
    progressNote: row.progressNote,
    params: row.params as RunParams,
    dataHash: row.dataHash,
    dataHashShort: row.dataHash ? row.dataHash.slice(0, 12) : null,
    rowCount: row.rowCount,
    error: row.error,
    appVersion: row.appVersion,
    attempt: row.attempt,
    rerunOf: row.rerunOf,
    createdBy: row.createdBy ? { id: row.createdBy, name: creatorName ?? "" } : null,
    createdAt: row.createdAt.toISOString(),
    startedAt: iso(row.startedAt),
    finishedAt: iso(row.finishedAt),
    heartbeatAt: iso(row.heartbeatAt),
  };
}

const { results: _results, ...summaryColumns } = getTableColumns(runs);
void _results;

export function createRunService(db: Database, runtime: RunRuntime, sources: RunDataSources) {
  const job = createRunJob(db, runtime, sources);
  const { enqueue } = job;

  async function runRow(studyId: string, runId: string): Promise<{ row: RunRow; creatorName: string | null }> {
    const [found] = await db
      .select({ row: runs, creatorName: users.name })
      .from(runs)
      .leftJoin(users, eq(users.id, runs.createdBy))
      .where(and(eq(runs.id, runId), eq(runs.studyId, studyId)));
    if (!found) throw notFound("This study has no such run (it may have been deleted).");
    return found;
  }

  const toRun = ({ row, creatorName }: { row: RunRow; creatorName: string | null }): Run => ({
    ...toSummary(row, creatorName),
    results: (row.results as RunResults | null) ?? null,
  });

  /** Creates a queued run and its "started" activity in one transaction, then queues its job. */
  async function startRun(studyId: string, user: Person, params: RunParams, rerunOf: string | null): Promise<Run> {
    checkWindows(params);
    traitSpecs(params, (await sources.traits.list(studyId)).traits);
    const row = await db.transaction(async (tx) => {
      const [created] = await tx
        .insert(runs)
        .values({
          studyId,
          name: params.name,
          params: params as unknown as Record<string, unknown>,
          appVersion: APP_VERSION,
          rerunOf,
          createdBy: user.id,
          progressNote: "Waiting for a process to take the job",
          // While queued, the heartbeat says when the attempt was queued (the lost-job sweep reads it).
          heartbeatAt: sql`now()`,
        })
        .returning();
      await tx.insert(activity).values({
        studyId,
        userId: user.id,
        kind: "run.started",
        summary: rerunOf ? `Re-ran "${params.name}" on today's data` : `Started the run "${params.name}"`,
        refType: "run",
        refId: created.id,
      });
      return created;
    });
    await enqueue(row);
    return toRun(await runRow(studyId, row.id));
  }

  return {
    /** The run job this service queues; the process registers it with registerRunJob (runJob.ts). */
    job,

    /** Counts of what would enter the analysis, per boundary and trait, without testing anything. */
    preview: (studyId: string, params: RunParams): Promise<RunPreview> => previewRun(db, sources, studyId, params),

    create: (studyId: string, user: Person, params: RunParams) => startRun(studyId, user, params, null),

    async list(studyId: string, query: { page: number; pageSize: number }): Promise<RunList> {
      const [{ total }] = await db.select({ total: count() }).from(runs).where(eq(runs.studyId, studyId));
      const rows = await db
        .select({ row: summaryColumns, creatorName: users.name })
        .from(runs)
        .leftJoin(users, eq(users.id, runs.createdBy))
        .where(eq(runs.studyId, studyId))
        .orderBy(desc(runs.createdAt), desc(runs.id))
        .limit(query.pageSize)
        .offset((query.page - 1) * query.pageSize);
      return { total, page: query.page, pageSize: query.pageSize, runs: rows.map((r) => toSummary(r.row, r.creatorName)) };
    },

    get: async (studyId: string, runId: string): Promise<Run> => toRun(await runRow(studyId, runId)),

    /** Queues a failed run again with the same parameters (a new attempt of the same run). */
    async retry(studyId: string, runId: string, user: Person): Promise<Run> {
      const row = await db.transaction(async (tx) => {
        const [retried] = await tx
          .update(runs)
          .set({
            status: "queued",
            attempt: sql`${runs.attempt} + 1`,
            progress: 0,
            progressNote: "Waiting for a process to take the job",
            error: null,
            results: null,
            dataHash: null,
            rowCount: null,
            jobId: null,
            appVersion: APP_VERSION,
            startedAt: null,
            finishedAt: null,
            heartbeatAt: sql`now()`,
          })
          .where(and(eq(runs.id, runId), eq(runs.studyId, studyId), eq(runs.status, "failed")))
          .returning();
        if (!retried) {
          const { row: existing } = await runRow(studyId, runId);
          throw conflict(`Only a failed run can be retried; this one is ${existing.status}.`);
        }
        await tx.insert(activity).values({ studyId, userId: user.id, kind: "run.started", summary: `Retried the run "${retried.name}"`, refType: "run", refId: retried.id });
        return retried;
      });
      await enqueue(row);
      return toRun(await runRow(studyId, row.id));
    },

    /** A new run with the same parameters on today's data, linked to the one it re-runs. */
    async rerun(studyId: string, runId: string, user: Person, body: { name?: string }): Promise<Run> {
      const { row } = await runRow(studyId, runId);
      const parsed = runParamsSchema.safeParse({ ...row.params, ...(body.name ? { name: body.name } : {}) });
      if (!parsed.success) throw conflict(`The parameters stored with this run can no longer be read (${parsed.error.issues[0].message}); start a new run instead.`);
      return startRun(studyId, user, parsed.data, row.id);
    },

    /** Side by side: what changed between `againstId` (the base) and `runId`. */
    async diff(studyId: string, runId: string, againstId: string): Promise<RunDiff> {
      const [run, base] = await Promise.all([runRow(studyId, runId), runRow(studyId, againstId)]);
      for (const [which, r] of [["run", run.row], ["against", base.row]] as const) {
        if (r.status !== "succeeded") throw conflict(`Only finished runs can be compared: the ${which === "run" ? "run" : "run given in against"} ("${r.name}") is ${r.status}.`, which === "against" ? { against: `This run is ${r.status}` } : undefined);
      }
      return compareRuns(toRun(base), toRun(run));
    },


    sweepInterrupted: job.sweepInterrupted,
    /** Sweeps now and every SWEEP_EVERY_MS until stopSweeping. */
    startSweeping: job.startSweeping,
    stopSweeping: job.stopSweeping,
  };
}
export type RunService = ReturnType<typeof createRunService>;
