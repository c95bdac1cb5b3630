// The timer behind the sweeps and the log pruning: a slow run is never doubled, a failing run is
// logged and the next turn still comes, and stopping waits for the run in progress.
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { RepeatingTask } from "../../../server/jobs/repeatingTask";

beforeEach(() => {
  vi.useFakeTimers();
});
afterEach(() => {
  vi.useRealTimers();
  vi.restoreAllMocks();
});

describe("RepeatingTask", () => {
  it("runs at once when asked, then every interval, skipping turns while a run is still going", async () => {
    let started = 0;
    let finish: () => void = () => undefined;
    const task = new RepeatingTask("test task", () => {
      started++;
      return new Promise<void>((resolve) => (finish = resolve));
    }, 1000);
    task.start({ now: true });
    expect(started).toBe(1);
    await vi.advanceTimersByTimeAsync(3500); // three turns pass while the first run is still going
    expect(started).toBe(1);
    finish();
    await vi.advanceTimersByTimeAsync(1000);
    expect(started).toBe(2);
    finish();
    await task.stop();
    await vi.advanceTimersByTimeAsync(5000);
    expect(started).toBe(2);
  });

  it("logs a failed run with its name and keeps its schedule", async () => {
    const logged = vi.spyOn(console, "error").mockImplementation(() => undefined);
    let runs = 0;
    const task = new RepeatingTask("pruning", async () => {
      runs++;
      throw new Error("database unreachable");
    }, 1000);
    task.start();
    await vi.advanceTimersByTimeAsync(2000);
    expect(runs).toBe(2);
    expect(logged).toHaveBeenCalledWith("pruning: database unreachable");
    await task.stop();
  });

  it("stop waits for the run in progress", async () => {
    let done = false;
    const task = new RepeatingTask("slow", async () => {
      await new Promise((resolve) => setTimeout(resolve, 500));
      done = true;
    }, 10_000);
    task.start({ now: true });
    const stopped = task.stop();
    await vi.advanceTimersByTimeAsync(500);
    await stopped;
    expect(done).toBe(true);
  });
});
