// Upkeep a process does on a timer (sweeping interrupted work, pruning logs): one run at a time,
// failures logged rather than thrown, and a stop that waits for the run in progress.

export class RepeatingTask {
  private timer: NodeJS.Timeout | null = null;
  private running: Promise<unknown> | null = null;

  /** `what` names the task in the log when a run fails. */
  constructor(
    private readonly what: string,
    private readonly task: () => Promise<unknown>,
    private readonly everyMs: number,
  ) {}

  /** Runs the task every `everyMs` (and at once when `now`), skipping a turn while a run is still going. */
  start({ now = false }: { now?: boolean } = {}): void {
    if (this.timer) return;
    if (now) this.runOnce();
    this.timer = setInterval(() => this.runOnce(), this.everyMs);
    // Upkeep alone never keeps a process alive.
    this.timer.unref();
  }

  async stop(): Promise<void> {
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
    await this.running;
  }

  private runOnce(): void {
    if (this.running) return;
    this.running = this.task()
      .catch((err: Error) => console.error(`${this.what}: ${err.message}`))
      .finally(() => (this.running = null));
  }
}
