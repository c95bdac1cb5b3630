// Runs tasks from ./tasks.ts in worker threads so long fits never block the server's event loop.
import { Worker } from "node:worker_threads";
import { availableParallelism } from "node:os";

interface Pending {
  resolve: (value: unknown) => void;
  reject: (err: Error) => void;
  onProgress?: (fraction: number, note?: string) => void;
}

interface Slot {
  worker: Worker;
  busy: boolean;
}

const ENTRY = new URL("./worker-entry.mjs", import.meta.url);

export class WorkerPool {
  private slots: Slot[] = [];
  private queue: Array<() => void> = [];
  private pending = new Map<number, Pending>();
  private nextId = 1;

  constructor(private readonly size = Math.max(1, Math.min(2, availableParallelism() - 1))) {}

  private spawn(): Slot {
    const worker = new Worker(ENTRY);
    const slot: Slot = { worker, busy: false };
    worker.on("message", (msg: { id: number; output?: unknown; error?: string; progress?: { fraction: number; note?: string } }) => {
      const p = this.pending.get(msg.id);
      if (!p) return;
      if (msg.progress) return p.onProgress?.(msg.progress.fraction, msg.progress.note);
      this.pending.delete(msg.id);
      if (msg.error !== undefined) p.reject(new Error(msg.error));
      else p.resolve(msg.output);
    });
    worker.on("error", (err) => {
      // A crashed worker fails its task; the slot is replaced on next use.
      for (const [id, p] of this.pending) {
        p.reject(err);
        this.pending.delete(id);
      }
      this.slots = this.slots.filter((s) => s !== slot);
    });
    worker.unref(); // an idle worker must not keep the process alive; run() refs it while busy
    this.slots.push(slot);
    return slot;
  }

  private acquire(): Promise<Slot> {
    const free = this.slots.find((s) => !s.busy) ?? (this.slots.length < this.size ? this.spawn() : null);
    if (free) {
      free.busy = true;
      return Promise.resolve(free);
    }
    return new Promise((resolve) => this.queue.push(() => resolve(this.acquire())));
  }

  async run<T>(task: string, input: unknown, onProgress?: (fraction: number, note?: string) => void): Promise<T> {
    const slot = await this.acquire();
    const id = this.nextId++;
    slot.worker.ref();
    try {
      return (await new Promise<unknown>((resolve, reject) => {
        this.pending.set(id, { resolve, reject, onProgress });
        slot.worker.postMessage({ id, task, input });
      })) as T;
    } finally {
      slot.worker.unref();
      slot.busy = false;
      this.queue.shift()?.();
    }
  }

  async close(): Promise<void> {
    await Promise.all(this.slots.map((s) => s.worker.terminate()));
    this.slots = [];
  }
}
