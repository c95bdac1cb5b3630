// The job queue (pg-boss on the test PostgreSQL) and the worker threads that computations run in.
import { afterAll, describe, expect, it } from "vitest";
import { JobQueue } from "../../server/jobs/queue";
import { WorkerPool } from "../../server/jobs/workerPool";

const pool = new WorkerPool(2);
afterAll(() => pool.close());

describe("worker pool", () => {
  it("computes off the main thread and reports progress", async () => {
    const progress: number[] = [];
    const total = await pool.run<number>("sum", { values: [2, 3, 5, 7] }, (fraction) => progress.push(fraction));
    expect(total).toBe(17);
    expect(progress).toEqual([0.25, 0.5, 0.75, 1]);
  });

  it("turns an unknown task into a rejected promise, not a crash", async () => {
    await expect(pool.run("no-such-task", {})).rejects.toThrow(/Unknown worker task/);
  });
});

describe("job queue", () => {
  it("delivers a sent job to the process that works its kind", async () => {
    const queue = new JobQueue(process.env.DATABASE_URL!);
    const seen: Array<{ data: { values: number[] }; jobId: string }> = [];
    let done!: () => void;
    const finished = new Promise<void>((resolve) => (done = resolve));
    queue.register<{ values: number[] }>("test-sum", async (data, jobId) => {
      seen.push({ data, jobId });
      done();
    });
    await queue.start();
    try {
      const id = await queue.send("test-sum", { values: [1, 2] });
      await finished;
      expect(seen).toEqual([{ data: { values: [1, 2] }, jobId: id }]);
      await expect(queue.send("unregistered", {})).rejects.toThrow(/No job kind/);
    } finally {
      await queue.stop();
    }
  });
});
