// Saved selectivity analyses. A run is created in the request (status queued) and computed as a job
// by whichever app process takes it: it reads the codebook, the trait values and the outcomes across
// each boundary (overrides applied) through the services that own them, hashes exactly what it read,
// runs the analysis in a worker thread and stores the results. A process that dies mid-run stops
// renewing the run's heartbeat; every process sweeps such runs to failed, and a person can retry.
import { createHash } from "node:crypto";
import { and, count, desc, eq, getTableColumns, isNull, sql } from "drizzle-orm";
import type { Database } from "../db";
import { APP_VERSION, RUN_STALE_AFTER_SECONDS } from "../config";
import { RepeatingTask } from "../jobs/repeatingTask";
import { activity, runs, taxa, users } from "../../db/schema/index";
import { analyzeSelectivity, chooseReference, countStates, encodeTrait, type EncodedTrait } from "../../shared/selectivity/index";
import type { SelectivityInput, SelectivityResult, SelectivityTaxon, SelectivityTraitSpec } from "../../shared/selectivity/types";
import { stageBelow } from "../../shared/timescale/index";
import {
  CORRECTION_LABELS,
  DEFAULT_MIN_INFORMATIVE_CLADES,
  runParamsSchema,
  type Run,
  type RunBoundaryDesign,
  type RunDiff,
  type RunList,
  type RunParams,
  type RunPreview,
  type RunResults,
  type RunSummary,
} from "../../shared/schemas/runs";
import type { OutcomesResult } from "../../shared/schemas/outcomes";
import type { ClassifiedTaxon } from "./outcomes";
import type { Trait } from "../../shared/schemas/traits";
import { conflict, DomainError, invalidInput, notFound } from "../domain/errors";
import type { JobQueue } from "../jobs/queue";
import { crisisCheck, crisisComparison, robustnessItems, robustnessPanels, robustnessResult, type RobustnessTaskOutput } from "./runChecks";
import type { CrisisComparisonResult } from "../../shared/selectivity/index";
import type { WorkerPool } from "../jobs/workerPool";

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

/** Shown wherever results are read or exported (docs/architecture.md, "Where a rule lives"). */
export const SELECTIVITY_CAUTION =
  "Selectivity results are statistical associations across a boundary, not proof of a kill mechanism; a shared cause can produce them.";


interface Person {
  id: string;
}

/** What the run service needs from the services that own the data. */
export interface RunDataSources {
  outcomes: { finalOutcomes(studyId: string, query: { boundary: number; window?: number }): Promise<{ summary: OutcomesResult; taxa: ClassifiedTaxon[] }> };
  /** The study's codebook, retired traits included. */
  traits: { list(studyId: string): Promise<{ traits: Trait[] }> };
}

export interface RunRuntime {
  jobs: JobQueue;
  workers: WorkerPool;
}

interface JobData {
  runId: string;
  attempt: number;
}

/** The "selectivity" worker task's input and output (server/jobs/tasks.ts). */
export interface SelectivityTaskInput {
  analyses: Array<{ label: string; input: SelectivityInput }>;
}
export type SelectivityTaskOutput = SelectivityResult[];

type TraitSpec = SelectivityTraitSpec & { traitId: string };

export interface BoundaryData {
  design: Omit<RunBoundaryDesign, "completeCases">;
  /** Victims and survivors, sorted by taxon id. */
  taxa: SelectivityTaxon[];
  /** Outcome warnings that touch taxa, in words, for the cautions. */
  warnings: string[];
}

export interface StudyData {
  specs: TraitSpec[];
  boundaries: BoundaryData[];
  dataHash: string;
  rowCount: number;
}

type RunRow = typeof runs.$inferSelect;

// ---------------------------------------------------------------- reading what a run analyses

/** The traits to test as the analysis reads them, or a 400 naming each parameter that does not fit the codebook. */
function traitSpecs(params: RunParams, codebook: Trait[]): TraitSpec[] {
  const byId = new Map(codebook.map((t) => [t.id, t]));
  const fields: Record<string, string> = {};
  const specs: TraitSpec[] = [];
  params.traits.forEach((chosen, i) => {
    const trait = byId.get(chosen.traitId);
    const at = `traits.${i}`;
    if (!trait) {
      fields[`${at}.traitId`] = "No trait of this study has this id (it may have been deleted)";
      return;
    }
    if (trait.retired) {
      fields[`${at}.traitId`] = `${trait.label} is retired from the codebook; restore it there to test it`;
      return;
    }
    const numeric = trait.kind === "numeric";
    if (chosen.reference !== undefined) {
      if (numeric) fields[`${at}.reference`] = `${trait.label} is numeric and has no reference state`;
      else if (!trait.states.some((s) => s.code === chosen.reference)) {
        fields[`${at}.reference`] = `"${chosen.reference}" is not a state of ${trait.label}; choose one of ${trait.states.map((s) => s.code).join(", ")}`;
      }
    }
    if (!numeric && chosen.transform !== undefined && chosen.transform !== "none") fields[`${at}.transform`] = `Only numeric traits can be transformed; ${trait.label} is ${trait.kind}`;
    if (!numeric && chosen.standardise) fields[`${at}.standardise`] = `Only numeric traits can be standardised; ${trait.label} is ${trait.kind}`;
    specs.push({
      traitId: trait.id,
      key: trait.key,
      label: trait.label,
      kind: trait.kind,
      states: trait.states.map((s) => ({ code: s.code, label: s.label })),
      ...(chosen.reference !== undefined && !numeric ? { reference: chosen.reference } : {}),
      transform: numeric ? (chosen.transform ?? trait.transform) : "none",
      standardise: numeric ? (chosen.standardise ?? false) : false,
      unit: trait.unit,
    });
  });
  if (Object.keys(fields).length) {
    throw invalidInput(`The run's traits do not fit this study's codebook: ${Object.values(fields).join("; ")}.`, fields);
  }
  return specs;
}

/** Boundaries without a window need a stage below them for the default window. */
function checkWindows(params: RunParams): void {
  const fields: Record<string, string> = {};
  params.boundaries.forEach((b, i) => {
    if (b.windowMyr === undefined && !stageBelow(b.boundaryMa)) {
      fields[`boundaries.${i}.windowMyr`] = `No stage of the time scale lies below ${b.boundaryMa} Ma, so there is no default window: give a window in Myr`;
    }
  });
  if (Object.keys(fields).length) throw invalidInput(`Give a window for ${Object.keys(fields).length === 1 ? "this boundary" : "these boundaries"}: ${Object.values(fields).join("; ")}.`, fields);
}

function boundaryLabel(given: string | undefined, result: OutcomesResult): string {
  if (given) return given;
  const unit = result.boundaryUnits[0];
  return unit ? `Base of the ${unit.label} (${result.boundary} Ma)` : `${result.boundary} Ma`;
}

const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString("en-US")} ${n === 1 ? one : many}`;

/** Outcome warnings that bear on a selectivity test, in words, for a run's cautions. */
function warningCautions(label: string, result: OutcomesResult): string[] {
  const out: string[] = [];
  const { singleInterval, lastSeenBelowBoundary, missingRange, invalidRange } = result.warnings;
  if (lastSeenBelowBoundary.count) out.push(`${label}, ${plural(lastSeenBelowBoundary.count, "taxon", "taxa")}: ${lastSeenBelowBoundary.note}`);
  if (singleInterval.count) out.push(`${label}, ${plural(singleInterval.count, "taxon", "taxa")}: ${singleInterval.note}`);
  const unusable = missingRange.count + invalidRange.count;
  if (unusable) out.push(`${label}: ${plural(unusable, "taxon", "taxa")} without a usable range count as not at risk and are not tested.`);
  return out;
}

/** SHA-256 of a canonical serialisation of exactly the data read: codebook entries and, per boundary, every taxon's id, name, clade, outcome and values, sorted by id. */
function hashData(specs: TraitSpec[], boundaries: BoundaryData[]): string {
  const canonical = {
    traits: specs.map((s) => [s.traitId, s.key, s.kind, s.states.map((c) => c.code)]),
    boundaries: boundaries.map((b) => ({
      boundaryMa: b.design.boundaryMa,
      windowMyr: b.design.windowMyr,
      taxa: b.taxa.map((t) => [t.id, t.name, t.clade, t.outcome, specs.map((s) => t.values[s.key] ?? null)]),
    })),
  };
  return createHash("sha256").update(JSON.stringify(canonical)).digest("hex");
}

const outcomeArray = (list: SelectivityTaxon[]) => Uint8Array.from(list, (t) => t.outcome);

/** Taxa with a usable value of every chosen trait: the multiple regression's sample. */
function completeCases(encoded: EncodedTrait[], n: number): number {
  let complete = 0;
  for (let i = 0; i < n; i++) {
    if (encoded.every((e) => (e.kind === "states" ? e.codes[i] >= 0 : !Number.isNaN(e.transformed[i])))) complete++;
  }
  return complete;
}

// ---------------------------------------------------------------- rows to API shapes

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

function interruptedMessage(heartbeat: Date | null, started: Date | null): string {
  const last = heartbeat ?? started;
  const since = last ? last.toISOString().replace("T", " ").replace(/\.\d+Z$/, " UTC") : "it started";
  return `Interrupted: the process computing this run stopped before it finished (no heartbeat since ${since}). Retry to compute it again.`;
}

/** The reason stored with a failed run: the message a person can act on (HttpErrors name the parameter at fault). */
const errorText = (err: unknown): string => (err instanceof Error ? err.message : String(err));

// ---------------------------------------------------------------- reading and computing (shared by run jobs and computeRunNow)

/** Reads the codebook, the trait values and each boundary's victims and survivors. */
export async function readStudyData(
  db: Database,
  sources: RunDataSources,
  studyId: string,
  params: RunParams,
  onBoundary?: (index: number, label: string) => Promise<void>,
): Promise<StudyData> {
  checkWindows(params);
  const specs = traitSpecs(params, (await sources.traits.list(studyId)).traits);
  const valueRows = await db
    .select({ id: taxa.id, values: taxa.traitValues })
    .from(taxa)
    .where(and(eq(taxa.studyId, studyId), isNull(taxa.deletedAt)));
  const valuesOf = new Map(valueRows.map((r) => [r.id, r.values]));

  const boundaries: BoundaryData[] = [];
  for (const [i, b] of params.boundaries.entries()) {
    let result: OutcomesResult;
    let classified: ClassifiedTaxon[];
    try {
      ({ summary: result, taxa: classified } = await sources.outcomes.finalOutcomes(studyId, { boundary: b.boundaryMa, window: b.windowMyr }));
    } catch (err) {
      // Name the boundary of the run that the outcomes service refused.
      if (err instanceof DomainError && err.kind === "invalid") {
        const fields = Object.fromEntries(Object.entries(err.fields ?? {}).map(([k, v]) => [`boundaries.${i}.${k === "window" ? "windowMyr" : "boundaryMa"}`, v]));
        throw invalidInput(`Boundary ${i + 1}: ${err.message}`, fields);
      }
      throw err;
    }
    const label = boundaryLabel(b.label, result);
    await onBoundary?.(i, label);
    const list: SelectivityTaxon[] = classified
      .filter((t) => t.outcome !== "excluded")
      .map((t) => {
        const stored = valuesOf.get(t.taxonId) ?? {};
        return {
          id: t.taxonId,
          name: t.name,
          clade: t.higherTaxon,
          outcome: t.outcome === "victim" ? (1 as const) : (0 as const),
          values: Object.fromEntries(specs.map((s) => [s.key, stored[s.traitId] ?? null])),
        };
      })
      .sort((x, y) => (x.id < y.id ? -1 : x.id > y.id ? 1 : 0));
    boundaries.push({
      design: {
        boundaryMa: result.boundary,
        windowMyr: result.window,
        windowDefaultFrom: result.windowDefaultFrom ? { name: result.windowDefaultFrom.name, label: result.windowDefaultFrom.label } : null,
        label,
        victims: result.counts.victim,
        survivors: result.counts.survivor,
        notAtRisk: result.counts.excluded,
        overridesApplied: result.overridesApplied,
      },
      taxa: list,
      warnings: warningCautions(label, result),
    });
  }
  return { specs, boundaries, dataHash: hashData(specs, boundaries), rowCount: boundaries.reduce((n, b) => n + b.taxa.length, 0) };
}

/** One boundary's analysis as the "selectivity" worker task takes it. */
function analysisInput(data: StudyData, b: BoundaryData, params: RunParams): SelectivityInput {
  return {
    taxa: b.taxa,
    traits: data.specs.map(({ traitId: _traitId, ...spec }) => spec),
    options: {
      correction: params.correction,
      forceFirth: params.forceFirth,
      level: params.level,
      confoundingThreshold: params.confoundingThreshold,
      minInformativeClades: params.minInformativeClades ?? DEFAULT_MIN_INFORMATIVE_CLADES,
    },
  };
}

/** What a run stores once its analyses are computed (one result per boundary, in order). */
function runResults(read: StudyData, computed: SelectivityTaskOutput): RunResults {
  return {
    boundaries: read.boundaries.map((b, i) => ({ ...b.design, completeCases: computed[i].design.completeCases, result: computed[i] })),
    traits: read.specs.map((s) => ({ traitId: s.traitId, key: s.key, label: s.label })),
    cautions: [SELECTIVITY_CAUTION, ...read.boundaries.flatMap((b) => b.warnings)],
  };
}

/**
 * Computes a run in this process, without the job queue, and stores it as succeeded with its
 * "started" and "finished" activity. It reads, hashes, analyses and stores exactly as a run job does;
 * it is for the demo seed, which runs before any app process works jobs. `at` dates the run
 * (default: now); the analysis runs on this thread, so keep it to small studies.
 */
export async function computeRunNow(
  db: Database,
  sources: RunDataSources,
  studyId: string,
  user: Person,
  params: RunParams,
  options: { at?: Date } = {},
): Promise<{ id: string; dataHash: string; results: RunResults }> {
  const read = await readStudyData(db, sources, studyId, params);
  const computed: SelectivityTaskOutput = read.boundaries.map((b) => analyzeSelectivity(analysisInput(read, b, params)));
  const results = runResults(read, computed);
  results.crisisVersusBackground = await crisisCheck(read, params, crisisComparison);
  const robustness = await robustnessItems(db, sources, studyId, read, params, computed);
  results.robustness = robustnessResult(robustness, robustnessPanels(robustness), params);
  const at = options.at ?? new Date();
  return db.transaction(async (tx) => {
    const [row] = await tx
      .insert(runs)
      .values({
        studyId,
        name: params.name,
        params: params as unknown as Record<string, unknown>,
        status: "succeeded",
        progress: 1,
        progressNote: "Done",
        dataHash: read.dataHash,
        rowCount: read.rowCount,
        results: results as unknown as Record<string, unknown>,
        appVersion: APP_VERSION,
        createdBy: user.id,
        createdAt: at,
        startedAt: at,
        finishedAt: at,
        heartbeatAt: at,
      })
      .returning({ id: runs.id });
    await tx.insert(activity).values([
      { studyId, userId: user.id, kind: "run.started", summary: `Started the run "${params.name}"`, refType: "run", refId: row.id, createdAt: at },
      { studyId, userId: user.id, kind: "run.succeeded", summary: `The run "${params.name}" finished`, refType: "run", refId: row.id, createdAt: at },
    ]);
    return { id: row.id, dataHash: read.dataHash, results };
  });
}

// ---------------------------------------------------------------- the service

export function createRunService(db: Database, runtime: RunRuntime, sources: RunDataSources) {
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

  /** Sends the job of the run's current attempt; a queue that refuses leaves the run failed with the reason. */
  async function enqueue(run: RunRow): Promise<void> {
    try {
      const jobId = await runtime.jobs.send<JobData>(SELECTIVITY_RUN_JOB, { runId: run.id, attempt: run.attempt });
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
  async function work(data: JobData): Promise<void> {
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
          status: "succeeded",
          progress: 1,
          progressNote: "Done",
          dataHash: read.dataHash,
          rowCount: read.rowCount,
          results: results as unknown as Record<string, unknown>,
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

  runtime.jobs.register<JobData>(SELECTIVITY_RUN_JOB, async (data) => work(data));

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
    /** Counts of what would enter the analysis, per boundary and trait, without testing anything. */
    async preview(studyId: string, params: RunParams): Promise<RunPreview> {
      const data = await readStudyData(db, sources, studyId, params);
      return {
        boundaries: data.boundaries.map((b) => {
          const outcome = outcomeArray(b.taxa);
          const encoded = data.specs.map((spec) => encodeTrait(spec, b.taxa));
          const traits = data.specs.map((spec, k) => {
            const e = encoded[k];
            let victimsUsed = 0;
            let survivorsUsed = 0;
            for (let i = 0; i < b.taxa.length; i++) {
              const usable = e.kind === "states" ? e.codes[i] >= 0 : !Number.isNaN(e.transformed[i]);
              if (!usable) continue;
              if (outcome[i]) victimsUsed++;
              else survivorsUsed++;
            }
            const notes = e.dropReasons.map((d) => `${plural(d.count, "value")} left out: ${d.reason} (e.g. ${d.examples.join(", ")})`);
            let states: RunPreview["boundaries"][number]["traits"][number]["states"] = [];
            let reference: string | null = null;
            if (e.kind === "states") {
              const counts = countStates(e.codes, outcome, spec.states.length);
              states = spec.states.map((s, j) => ({ code: s.code, label: s.label, victims: counts.victims[j], survivors: counts.survivors[j] }));
              const chosen = chooseReference(spec, counts);
              reference = chosen.index >= 0 ? spec.states[chosen.index].code : null;
              if (chosen.note) notes.push(chosen.note);
              const held = states.filter((s) => s.victims + s.survivors > 0);
              const empty = states.filter((s) => s.victims + s.survivors === 0);
              if (held.length === 1) notes.push(`Only one state (${held[0].label}) holds taxa at risk: there is nothing to compare.`);
              if (empty.length && held.length > 1) notes.push(`No taxa at risk in ${empty.map((s) => s.label).join(", ")}: no odds ratio for ${empty.length === 1 ? "this state" : "these states"}.`);
            }
            return {
              traitId: spec.traitId,
              key: spec.key,
              label: spec.label,
              kind: spec.kind,
              used: e.used,
              victimsUsed,
              survivorsUsed,
              droppedMissing: e.missing,
              droppedInvalid: e.invalid,
              states,
              reference,
              transform: spec.transform,
              standardise: spec.standardise,
              notes,
            };
          });
          const complete = completeCases(encoded, b.taxa.length);
          const window = b.design.windowDefaultFrom ? `${b.design.windowMyr} Myr (the ${b.design.windowDefaultFrom.label})` : `${b.design.windowMyr} Myr`;
          const summary = [
            `Across ${b.design.label}, with a window of ${window} below it: ${plural(b.design.victims + b.design.survivors, "taxon", "taxa")} at risk enter, ${plural(b.design.victims, "victim")} and ${plural(b.design.survivors, "survivor")}; ${plural(b.design.notAtRisk, "taxon", "taxa")} not at risk stay out.`,
            ...traits.map((t) => {
              const dropped = t.droppedMissing + t.droppedInvalid;
              return `${t.label}: ${plural(t.used, "taxon", "taxa")} (${t.victimsUsed} victims, ${t.survivorsUsed} survivors)${dropped ? `, ${plural(dropped, "taxon", "taxa")} dropped for ${t.droppedInvalid ? "missing or unusable values" : "missing values"}` : ""}.`;
            }),
            `${plural(complete, "taxon", "taxa")} have every chosen trait and enter the multiple regression.`,
          ].join(" ");
          return { ...b.design, completeCases: complete, traits, summary };
        }),
      };
    },

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

    sweepInterrupted,
    /** Sweeps now and every SWEEP_EVERY_MS until stopSweeping. */
    startSweeping: () => sweeper.start({ now: true }),
    stopSweeping: () => sweeper.stop(),
  };
}
export type RunService = ReturnType<typeof createRunService>;

// ---------------------------------------------------------------- comparing two runs

type Pair = { base: number | null; run: number | null };
const pair = (base: number | null | undefined, run: number | null | undefined): Pair => ({ base: base ?? null, run: run ?? null });
const differs = (p: Pair) => p.base !== p.run;

function paramChanges(base: RunParams, run: RunParams, traitLabel: (id: string) => string): string[] {
  const out: string[] = [];
  const boundaryText = (p: RunParams) => p.boundaries.map((b) => `${b.boundaryMa} Ma${b.windowMyr !== undefined ? ` (window ${b.windowMyr} Myr)` : ""}`).join(", ");
  if (boundaryText(base) !== boundaryText(run)) out.push(`Boundaries: ${boundaryText(base)} → ${boundaryText(run)}`);
  const traitText = (t: RunParams["traits"][number]) =>
    [traitLabel(t.traitId), t.reference ? `reference ${t.reference}` : null, t.transform ? t.transform : null, t.standardise ? "standardised" : null].filter(Boolean).join(", ");
  const baseTraits = new Map(base.traits.map((t) => [t.traitId, traitText(t)]));
  const runTraits = new Map(run.traits.map((t) => [t.traitId, traitText(t)]));
  for (const [id, text] of baseTraits) {
    if (!runTraits.has(id)) out.push(`Trait dropped: ${text}`);
    else if (runTraits.get(id) !== text) out.push(`Trait options: ${text} → ${runTraits.get(id)}`);
  }
  for (const [id, text] of runTraits) if (!baseTraits.has(id)) out.push(`Trait added: ${text}`);
  if (base.correction !== run.correction) out.push(`Correction: ${CORRECTION_LABELS[base.correction]} → ${CORRECTION_LABELS[run.correction]}`);
  if (base.forceFirth !== run.forceFirth) out.push(`Firth's regression forced: ${base.forceFirth ? "yes" : "no"} → ${run.forceFirth ? "yes" : "no"}`);
  if (base.level !== run.level) out.push(`Confidence level: ${base.level} → ${run.level}`);
  if (base.confoundingThreshold !== run.confoundingThreshold) out.push(`Confounding threshold: ${base.confoundingThreshold} → ${run.confoundingThreshold}`);
  if (base.stratifyBy !== run.stratifyBy) out.push(`Stratified by: ${base.stratifyBy} → ${run.stratifyBy}`);
  return out;
}

/**
 * Pairs items of two lists by key (the n-th item of a key with the n-th of the same key), in the
 * order of the run and then the base's leftovers.
 */
function pairBy<T>(base: T[], run: T[], key: (item: T) => string): Array<{ key: string; base: T | null; run: T | null }> {
  const keyed = (list: T[]) => {
    const seen = new Map<string, number>();
    return list.map((item) => {
      const k = key(item);
      const n = seen.get(k) ?? 0;
      seen.set(k, n + 1);
      return { k, slot: `${k}\u0000${n}`, item };
    });
  };
  const baseSlots = new Map(keyed(base).map((b) => [b.slot, b.item]));
  const runKeyed = keyed(run);
  const out: Array<{ key: string; base: T | null; run: T | null }> = runKeyed.map((r) => ({ key: r.k, base: baseSlots.get(r.slot) ?? null, run: r.item }));
  const taken = new Set(runKeyed.map((r) => r.slot));
  for (const b of keyed(base)) if (!taken.has(b.slot)) out.push({ key: b.k, base: b.item, run: null });
  return out;
}

const presence = (p: { base: unknown; run: unknown }) => (p.base && p.run ? "both" : p.base ? "baseOnly" : "runOnly") as "both" | "baseOnly" | "runOnly";

export function compareRuns(base: Run, run: Run): RunDiff {
  const labels = new Map([...(base.results?.traits ?? []), ...(run.results?.traits ?? [])].map((t) => [t.traitId, t.label]));
  const { results: _b, ...baseSummary } = base;
  const { results: _r, ...runSummary } = run;
  void _b;
  void _r;
  return {
    base: baseSummary,
    run: runSummary,
    hashChanged: base.dataHash !== run.dataHash,
    rowCount: { ...pair(base.rowCount, run.rowCount), change: base.rowCount !== null && run.rowCount !== null ? run.rowCount - base.rowCount : null },
    paramsChanged: paramChanges(base.params, run.params, (id) => labels.get(id) ?? id),
    boundaries: pairBy(base.results?.boundaries ?? [], run.results?.boundaries ?? [], (b) => String(b.boundaryMa)).map((bp) => {
      const b = bp.base;
      const r = bp.run;
      return {
        boundaryMa: (r ?? b)!.boundaryMa,
        windowMyr: pair(b?.windowMyr, r?.windowMyr),
        label: (r ?? b)!.label,
        presence: presence(bp),
        victims: pair(b?.victims, r?.victims),
        survivors: pair(b?.survivors, r?.survivors),
        completeCases: pair(b?.completeCases, r?.completeCases),
        traits: pairBy(b?.result.traits ?? [], r?.result.traits ?? [], (t) => t.key).map((tp) => {
          const contrasts = pairBy(tp.base?.contrasts ?? [], tp.run?.contrasts ?? [], (c) => c.contrast).map((cp) => {
            const numbers = {
              crudeOddsRatio: pair(cp.base?.crude.estimate, cp.run?.crude.estimate),
              cladeAdjustedOddsRatio: pair(cp.base?.cladeAdjusted?.estimate, cp.run?.cladeAdjusted?.estimate),
              modelAdjustedOddsRatio: pair(cp.base?.modelAdjusted?.estimate, cp.run?.modelAdjusted?.estimate),
            };
            const flagged = { base: cp.base?.flagged ?? null, run: cp.run?.flagged ?? null };
            return { contrast: cp.key, ...numbers, flagged, changed: Object.values(numbers).some(differs) || flagged.base !== flagged.run };
          });
          const numbers = {
            used: pair(tp.base?.used, tp.run?.used),
            pValue: pair(tp.base?.test.pValue, tp.run?.test.pValue),
            adjustedPValue: pair(tp.base?.test.adjustedPValue, tp.run?.test.adjustedPValue),
          };
          return {
            key: tp.key,
            label: (tp.run ?? tp.base)!.label,
            presence: presence(tp),
            ...numbers,
            contrasts,
            changed: Object.values(numbers).some(differs) || contrasts.some((c) => c.changed),
          };
        }),
      };
    }),
  };
}
