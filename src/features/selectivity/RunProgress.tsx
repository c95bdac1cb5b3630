import type { Run } from "@shared/schemas/runs";
import { Card } from "../../components/Card";
import { ProgressBar } from "../../components/ProgressBar";

/** A queued or running run: a progress bar with what the computation is doing, and word that the screen stays free. */
export function RunProgress({ run }: { run: Run }) {
  const percent = Math.round(Math.max(0, Math.min(1, run.progress)) * 100);
  const waiting = run.status === "queued";
  const label = waiting ? "Waiting for a process to take the run" : "Computing the selectivity tests";
  return (
    <Card>
      <div data-testid="run-progress">
        <ProgressBar label={label} value={run.progress} busy valueText={`${percent}%${run.progressNote ? `: ${run.progressNote}` : ""}`} />
        <p className="mt-2 text-sm text-stone-600" aria-live="polite">
          {run.progressNote ?? (waiting ? "In the queue." : "Working.")}
        </p>
        <p className="mt-3 text-sm text-stone-500">
          The run goes on on the server: you can keep working, leave this screen and come back, or follow it in the list of runs.
        </p>
      </div>
    </Card>
  );
}
