// The job queue: pg-boss on the app's own PostgreSQL, so any number of app processes, on one
// machine or several, take jobs from the same queue. A handler runs in the process that took the
// job; heavy computation inside it goes to the worker pool (./workerPool.ts).
import PgBoss from "pg-boss";

export type JobHandler<T> = (data: T, jobId: string) => Promise<void>;

export class JobQueue {
  private readonly boss: PgBoss;
  private readonly handlers = new Map<string, JobHandler<any>>();
  private started = false;

  constructor(databaseUrl: string) {
    this.boss = new PgBoss({
      connectionString: databaseUrl,
      max: 4,
      schedule: false,
      // Interrupted jobs are not retried behind the person's back: the run is marked failed with
      // its reason and they choose to retry.
      retryLimit: 0,
      expireInHours: 2,
    });
    this.boss.on("error", (err) => console.error(`job queue: ${err.message}`));
  }

  /** Declares a job kind and the handler this process uses to work it. */
  register<T extends object>(name: string, handler: JobHandler<T>): void {
    this.handlers.set(name, handler);
  }

  /** Starts the queue; with `work: false` this process only sends jobs and leaves them to others. */
  async start(opts: { work: boolean } = { work: true }): Promise<void> {
    if (this.started) return;
    await this.boss.start();
    for (const [name, handler] of this.handlers) {
      await this.boss.createQueue(name);
      if (!opts.work) continue;
      await this.boss.work<object>(name, { pollingIntervalSeconds: 0.5, batchSize: 1 }, async ([job]) => handler(job.data, job.id));
    }
    this.started = true;
  }

  async send<T extends object>(name: string, data: T): Promise<string> {
    if (!this.handlers.has(name)) throw new Error(`No job kind "${name}" is registered.`);
    const id = await this.boss.send(name, data);
    if (!id) throw new Error(`The job queue refused a "${name}" job.`);
    return id;
  }

  /** Whether a job still waits for a process or is being worked (false once it ended, expired or vanished). */
  async isPending(name: string, id: string): Promise<boolean> {
    const job = await this.boss.getJobById(name, id);
    return job !== null && (job.state === "created" || job.state === "retry" || job.state === "active");
  }

  async stop(): Promise<void> {
    if (!this.started) return;
    this.started = false;
    await this.boss.stop({ graceful: true, wait: true, timeout: 5000 });
  }
}
