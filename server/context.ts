import type { AppConfig } from "./config";
import type { Database, DatabaseHandle } from "./db";
import type { Mailer } from "./mail/mailer";
import type { Services } from "./services";
import type { JobQueue } from "./jobs/queue";
import type { WorkerPool } from "./jobs/workerPool";

/** Everything a request needs, built once per process and handed to routes and services. */
export interface AppContext {
  config: AppConfig;
  db: Database;
  database: DatabaseHandle;
  mailer: Mailer;
  services: Services;
  jobs: JobQueue;
  workers: WorkerPool;
}
