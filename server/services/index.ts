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

/** What services need besides the database and mail: the job queue and the worker threads. */
export interface Runtime {
  jobs: JobQueue;
  workers: WorkerPool;
}

export function createServices(db: Database, mailer: Mailer, appUrl: string, runtime: Runtime) {
  void runtime; // handed to the services that queue jobs (runs, comparisons)
  return {
    users: createUserService(db),
    studies: createStudyService(db),
    invitations: createInvitationService(db, mailer, appUrl),
    outbox: createOutboxService(db),
    timescale: createTimescaleService(db),
    outcomes: createOutcomeService(db),
  };
}
export type Services = ReturnType<typeof createServices>;
