import type { AppConfig } from "./config";
import { connectDatabase } from "./db";
import type { AppContext } from "./context";
import { createMailer } from "./mail/mailer";
import { startFakeSmtp, type FakeSmtp } from "./mail/fakeSmtp";
import { createServices } from "./services";
import { JobQueue } from "./jobs/queue";
import { WorkerPool } from "./jobs/workerPool";
import { registerRunJob } from "./services/runJob";
import { registerNotificationJobs } from "./services/notifications";

export interface RunningContext extends AppContext {
  fakeSmtp: FakeSmtp | null;
  close(): Promise<void>;
}

/** Connects the database and the mail transport (starting the local fake when SMTP_URL is unset). */
export async function createContext(config: AppConfig): Promise<RunningContext> {
  const database = connectDatabase(config.databaseUrl);
  let fakeSmtp: FakeSmtp | null = null;
  let smtpUrl = config.smtpUrl;
  if (!smtpUrl) {
    if (config.environment === "production") throw new Error("SMTP_URL must be set in production.");
    // The console copy is how a person alone on their machine follows a link; tests stay quiet.
    fakeSmtp = await startFakeSmtp(database.db, config.environment === "test" ? undefined : (lines) => console.info(lines));
    smtpUrl = `smtp://127.0.0.1:${fakeSmtp.port}`;
  }
  const mailer = createMailer(smtpUrl, config.mailFrom, fakeSmtp !== null);
  const jobs = new JobQueue(config.databaseUrl);
  const workers = new WorkerPool();
  const services = createServices(database.db, mailer, config.appUrl, { jobs, workers, gridMaxTaxa: config.gridMaxTaxa });
  // Every app process works the shared queue: the job kinds are declared here, before it starts.
  registerRunJob(jobs, services.runs.job);
  registerNotificationJobs(jobs, services.notifications);
  await jobs.start({ work: config.jobWorkers });
  services.runs.startSweeping();
  services.imports.startSweeping();
  services.notifications.startDigestClock();
  services.taxaGrid.startPruning();
  return {
    config,
    db: database.db,
    database,
    mailer,
    services,
    jobs,
    workers,
    fakeSmtp,
    async close() {
      await services.runs.stopSweeping();
      await services.imports.stopSweeping();
      await services.notifications.stopDigestClock();
      await services.taxaGrid.stopPruning();
      await jobs.stop();
      await workers.close();
      mailer.close();
      await fakeSmtp?.close();
      await database.close();
    },
  };
}
