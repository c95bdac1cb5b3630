import type { Database } from "../db";
import type { Mailer } from "../mail/mailer";
import type { JobQueue } from "../jobs/queue";
import type { WorkerPool } from "../jobs/workerPool";
import { createInvitationService } from "./invitations";
import { createOutboxService } from "./outbox";
import { createStudyService } from "./studies";
import { createUserService } from "./users";
import { createTimescaleService } from "./timescale";
import { createOutcomeService } from "./outcomes";
import { createRunService } from "./runs";
import { createRunReplicationService } from "./runReplication";
import { createApiTokenService } from "./apiTokens";
import { createTraitService } from "./traits";
import { createTaxonService } from "./taxa";
import { createTaxaGrid } from "./taxaGrid";
import { createDecisionService } from "./decisions";
import { createImportService } from "./traitTableImports";
import { createOccurrenceService } from "./occurrences";
import { createTimeBinService } from "./timeBins";
import { createExportService } from "./exports";
import { createModernListService } from "./modernLists";
import { createComparisonService } from "./comparisons";
import { createNotificationService } from "./notifications";
import { createThreadService } from "./threads";
import { createActivityService } from "./activity";
import { createTurnoverService } from "./turnover";

/** What services need besides the database and mail: the job queue and the worker threads. */
export interface Runtime {
  jobs: JobQueue;
  workers: WorkerPool;
  /** Taxa the grid copies may hold in memory in this process (GRID_MAX_TAXA). */
  gridMaxTaxa?: number;
}

export function createServices(db: Database, mailer: Mailer, appUrl: string, runtime: Runtime) {
  const notifications = createNotificationService(db, mailer, appUrl, runtime.jobs);
  const taxaGrid = createTaxaGrid(db, { maxTaxa: runtime.gridMaxTaxa });
  // One instance of each service: the run service reads through the same outcomes and codebook.
  const outcomes = createOutcomeService(db);
  const traits = createTraitService(db);
  const runSources = { outcomes, traits };
  const runs = createRunService(db, runtime, runSources);
  return {
    users: createUserService(db),
    apiTokens: createApiTokenService(db),
    studies: createStudyService(db),
    invitations: createInvitationService(db, mailer, appUrl),
    outbox: createOutboxService(db),
    timescale: createTimescaleService(db),
    outcomes,
    turnover: createTurnoverService(db, outcomes),
    runs,
    runReplication: createRunReplicationService(db, runSources, runs),
    traits,
    taxa: createTaxonService(db, taxaGrid),
    taxaGrid,
    decisions: createDecisionService(db),
    imports: createImportService(db),
    occurrences: createOccurrenceService(db),
    timeBins: createTimeBinService(db),
    exports: createExportService(db),
    modernLists: createModernListService(db),
    comparisons: createComparisonService(db),
    notifications,
    threads: createThreadService(db, notifications),
    activity: createActivityService(db),
  };
}
export type Services = ReturnType<typeof createServices>;
