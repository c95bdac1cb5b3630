// The run job: whichever app process takes a run's job claims it for its attempt, renews its
// heartbeat while it computes (reading through runData.ts, analysing in worker threads) and stores
// the results or the reason it failed. A process that dies mid-run stops renewing the heartbeat;
// every process sweeps such runs, and queued runs whose job was lost, to failed with the reason,
// and a person can retry. The job kind is declared by registerRunJob where the process starts.
import { and, eq, sql } from "drizzle-orm";
import type { Database } from "../db";
import { RUN_STALE_AFTER_SECONDS } from "../config";
import { RepeatingTask } from "../jobs/repeatingTask";
import type { JobQueue } from "../jobs/queue";
import type { WorkerPool } from "../jobs/workerPool";
import { activity, runs } from "../../db/schema/index";
import type { CrisisComparisonResult } from "../../shared/selectivity/index";
import { runParamsSchema } from "../../shared/schemas/runs";
import { DomainError } from "../domain/errors";
import { crisisCheck, robustnessItems, robustnessResult, type RobustnessTaskOutput } from "./runChecks";
import { plural, readStudyData, type RunDataSources } from "./runData";
import { analysisInput, runResults, succeededColumns, type SelectivityTaskInput, type SelectivityTaskOutput } from "./runAnalysis";

/** The job kind every app process works. */
export const SELECTIVITY_RUN_JOB = "selectivity-run";
/** How often the computing process renews a running run's heartbeat. */
export const HEARTBEAT_EVERY_MS = 5_000;
/** A running run whose heartbeat is older than this is taken for interrupted (server/config.ts). */
export const STALE_AFTER_SECONDS = RUN_STALE_AFTER_SECONDS;
/** How often each process looks for interrupted runs. */
export const SWEEP_EVERY_MS = 30_000;
/** Fewest milliseconds between two progress writes of one run. */
const PROGRESS_WRITE_GAP_MS = 250;

export interface RunRuntime {
  jobs: JobQueue;
  workers: WorkerPool;
}

/** A run job's data: the run and the attempt the job computes. */
export interface RunJobData {
  runId: string;
  attempt: number;
}

type RunRow = typeof runs.$inferSelect;

function interruptedMessage(heartbeat: Date | null, started: Date | null): string {
  const last = heartbeat ?? started;
  const since = last ? last.toISOString().replace("T", " ").replace(/\.\d+Z$/, " UTC") : "it started";
  return `Interrupted: the process computing this run stopped before it finished (no heartbeat since ${since}). Retry to compute it again.`;
}

/** The reason stored with a failed run: the message a person can act on (HttpErrors name the parameter at fault). */
const errorText = (err: unknown): string => (err instanceof Error ? err.message : String(err));

/** The run job of this process: queueing a run's attempt, working a job, and the sweeps. */
export function createRunJob(db: Database, runtime: RunRuntime, sources: RunDataSources) {
  /** Sends the job of the run's current attempt; a queue that refuses leaves the run failed with the reason. */
  async function enqueue(run: RunRow): Promise<void> {
    try {
      const jobId = await runtime.jobs.send<RunJobData>(SELECTIVITY_RUN_JOB, { runId: run.id, attempt: run.attempt });
      await db.update(runs).set({ jobId }).where(and(eq(runs.id, run.id), eq(runs.attempt, run.attempt)));
    } catch (err) {
      const reason = `The job queue did not accept this run: ${errorText(err)}. Retry to queue it again.`;
      await db
        .update(runs)
        .set({ status: "failed", error: reason, finishedAt: sql`now()` })
        .where(and(eq(runs.id, run.id), eq(runs.attempt, run.attempt), eq(runs.status, "queued")));
      throw new DomainError("unavailable", "queue_unavailable", reason);
    }
  }


  async function recordFinish(row: Pick<RunRow, "id" | "studyId" | "name" | "createdBy">, outcome: "succeeded" | "failed", reason?: string): Promise<void> {
    await db.insert(activity).values({
      studyId: row.studyId,
      userId: row.createdBy,
      kind: outcome === "succeeded" ? "run.succeeded" : "run.failed",
      summary: outcome === "succeeded" ? `The run "${row.name}" finished` : `The run "${row.name}" failed: ${reason}`,
      refType: "run",
      refId: row.id,
    });
  }

  /** Works one job: claims the run for its attempt, computes it, stores the results or the reason it failed. */
  async function work(data: RunJobData): Promise<void> {
    const current = and(eq(runs.id, data.runId), eq(runs.attempt, data.attempt), eq(runs.status, "running"));
    const [row] = await db
      .update(runs)
      .set({ status: "running", startedAt: sql`now()`, heartbeatAt: sql`now()`, progress: 0, progressNote: "Reading the trait table and the outcomes" })
      .where(and(eq(runs.id, data.runId), eq(runs.attempt, data.attempt), eq(runs.status, "queued")))
      .returning();
    if (!row) return; // retried, swept or taken by another process meanwhile

    const heartbeat = setInterval(() => {
      db.update(runs)
        .set({ heartbeatAt: sql`now()` })
        .where(current)
        .catch((err: Error) => console.error(`run ${row.id}: heartbeat not written: ${err.message}`));
    }, HEARTBEAT_EVERY_MS);
    heartbeat.unref();

    // Progress writes are coalesced: at most one in flight, the newest report wins.
    let latest: { fraction: number; note: string } | null = null;
    let writing: Promise<void> = Promise.resolve();
    let scheduled = false;
    const report = (fraction: number, note: string) => {
      latest = { fraction, note };
      if (scheduled) return;
      scheduled = true;
      writing = writing
        .then(() => new Promise((resolve) => setTimeout(resolve, PROGRESS_WRITE_GAP_MS)))
        .then(async () => {
          scheduled = false;
          const { fraction: f, note: n } = latest!;
          await db.update(runs).set({ progress: Math.min(1, Math.max(0, f)), progressNote: n, heartbeatAt: sql`now()` }).where(current);
        })
        .catch((err: Error) => console.error(`run ${row.id}: progress not written: ${err.message}`));
    };

    try {
      const params = runParamsSchema.parse(row.params);
      const count = params.boundaries.length;
      const read = await readStudyData(db, sources, row.studyId, params, async (i, label) => report((0.1 * i) / count, `Reading the outcomes across ${label} (${i + 1} of ${count})`));
      report(0.1, `Read ${plural(read.rowCount, "taxon row")}; testing selectivity`);
      const analyses = read.boundaries.map((b) => ({ label: b.design.label, input: analysisInput(read, b, params) }));
      const computed = await runtime.workers.run<SelectivityTaskOutput>("selectivity", { analyses } satisfies SelectivityTaskInput, (fraction, note) =>
        report(0.1 + 0.4 * fraction, note ?? "Testing selectivity"),
      );
      const results = runResults(read, computed);
      report(0.5, "Testing crisis against background");
      results.crisisVersusBackground = await crisisCheck(read, params, (input) => runtime.workers.run<CrisisComparisonResult>("crisisComparison", input));
      const robustness = await robustnessItems(db, sources, row.studyId, read, params, computed, (i, label) =>
        report(0.55 + (0.1 * i) / count, `Robustness panel: reading other windows across ${label} (${i + 1} of ${count})`),
      );
      const panels = await runtime.workers.run<RobustnessTaskOutput>("robustness", { items: robustness }, (fraction, note) => report(0.65 + 0.33 * fraction, note ?? "Robustness panel"));
      results.robustness = robustnessResult(robustness, panels, params);
      await writing;
      const [stored] = await db
        .update(runs)
        .set({
          ...succeededColumns(read, results),
          finishedAt: sql`now()`,
          heartbeatAt: sql`now()`,
        })
        .where(current)
        .returning({ id: runs.id });
      if (stored) await recordFinish(row, "succeeded");
    } catch (err) {
      const reason = errorText(err);
      await writing;
      const [stored] = await db
        .update(runs)
        .set({ status: "failed", error: reason, finishedAt: sql`now()`, progressNote: "Failed" })
        .where(current)
        .returning({ id: runs.id })
        .catch((writeErr: Error) => {
          console.error(`run ${row.id}: failure not recorded (${writeErr.message}); the sweep will mark it interrupted`);
          return [];
        });
      if (stored) await recordFinish(row, "failed", reason).catch(() => undefined);
    } finally {
      clearInterval(heartbeat);
    }
  }

  /** Marks runs whose computing process stopped (a heartbeat older than STALE_AFTER_SECONDS) as failed, with the reason; returns their ids. */
  async function sweepInterrupted(): Promise<string[]> {
    const stale = await db
      .select({ id: runs.id, studyId: runs.studyId, name: runs.name, createdBy: runs.createdBy, attempt: runs.attempt, heartbeatAt: runs.heartbeatAt, startedAt: runs.startedAt })
      .from(runs)
      .where(and(eq(runs.status, "running"), sql`coalesce(${runs.heartbeatAt}, ${runs.startedAt}, ${runs.createdAt}) < now() - make_interval(secs => ${STALE_AFTER_SECONDS})`));
    const swept: string[] = [];
    for (const run of stale) {
      const reason = interruptedMessage(run.heartbeatAt, run.startedAt);
      // The heartbeat is checked again in the update, so a run that came back to life is left alone.
      const [failed] = await db
        .update(runs)
        .set({ status: "failed", error: reason, finishedAt: sql`now()`, progressNote: "Interrupted" })
        .where(
          and(
            eq(runs.id, run.id),
            eq(runs.attempt, run.attempt),
            eq(runs.status, "running"),
            sql`coalesce(${runs.heartbeatAt}, ${runs.startedAt}, ${runs.createdAt}) < now() - make_interval(secs => ${STALE_AFTER_SECONDS})`,
          ),
        )
        .returning({ id: runs.id });
      if (!failed) continue;
      swept.push(run.id);
      await recordFinish(run, "failed", reason);
    }
    return [...swept, ...(await sweepLostJobs())];
  }

  /**
   * Marks failed, with the reason, queued runs whose job no process can take any more: never sent
   * (the process stopped between saving the run and queueing it) or ended without the run being
   * claimed. A run whose job still waits, however long, is left alone.
   */
  async function sweepLostJobs(): Promise<string[]> {
    const queued = await db
      .select({ id: runs.id, studyId: runs.studyId, name: runs.name, createdBy: runs.createdBy, attempt: runs.attempt, jobId: runs.jobId })
      .from(runs)
      .where(and(eq(runs.status, "queued"), sql`coalesce(${runs.heartbeatAt}, ${runs.createdAt}) < now() - make_interval(secs => ${STALE_AFTER_SECONDS})`));
    const swept: string[] = [];
    for (const run of queued) {
      if (run.jobId && (await runtime.jobs.isPending(SELECTIVITY_RUN_JOB, run.jobId))) continue;
      const reason = run.jobId
        ? "The queue dropped this run's job before any process took it. Retry to queue it again."
        : "This run was saved but never reached the job queue (the process stopped in between). Retry to queue it.";
      const [failed] = await db
        .update(runs)
        .set({ status: "failed", error: reason, finishedAt: sql`now()`, progressNote: "Not started" })
        .where(and(eq(runs.id, run.id), eq(runs.attempt, run.attempt), eq(runs.status, "queued"), run.jobId ? eq(runs.jobId, run.jobId) : sql`${runs.jobId} IS NULL`))
        .returning({ id: runs.id });
      if (!failed) continue;
      swept.push(run.id);
      await recordFinish(run, "failed", reason);
    }
    return swept;
  }

  const sweeper = new RepeatingTask("run sweep", sweepInterrupted, SWEEP_EVERY_MS);

  return {
    enqueue,
    work,
    sweepInterrupted,
    /** Sweeps now and every SWEEP_EVERY_MS until stopSweeping. */
    startSweeping: () => sweeper.start({ now: true }),
    stopSweeping: () => sweeper.stop(),
  };
}
export type RunJob = ReturnType<typeof createRunJob>;

/**
 * Declares the selectivity-run job kind and the handler this process works it with. Call it where
 * the process starts, before the queue starts: a process that has not registered it can neither
 * queue runs nor work them.
 */
export function registerRunJob(queue: JobQueue, job: Pick<RunJob, "work">): void {
  queue.register<RunJobData>(SELECTIVITY_RUN_JOB, async (data) => job.work(data));
}
