// Entry of a computation worker thread. Plain JavaScript so it starts the same way under tsx,
// vitest and node: it registers tsx's loader, then loads the TypeScript task table.
import { parentPort } from "node:worker_threads";
import { register } from "tsx/esm/api";

register();
const { WORKER_TASKS } = await import("./tasks.ts");

parentPort.on("message", async ({ id, task, input }) => {
  const run = WORKER_TASKS[task];
  if (!run) {
    parentPort.postMessage({ id, error: `Unknown worker task "${task}"` });
    return;
  }
  try {
    const progress = (fraction, note) => parentPort.postMessage({ id, progress: { fraction, note } });
    const output = await run(input, progress);
    parentPort.postMessage({ id, output });
  } catch (err) {
    parentPort.postMessage({ id, error: err instanceof Error ? err.message : String(err) });
  }
});
