import type { Run } from "@shared/schemas/runs";
import { Card } from "../../components/Card";
import { Spinner } from "../../components/Spinner";

/** A queued or running run: a progress bar with what the computation is doing, and word that the screen stays free. */
export function RunProgress({ run }: { run: Run }) {
  const percent = Math.round(Math.max(0, Math.min(1, run.progress)) * 100);
  const waiting = run.status === "queued";
  const label = waiting ? "Waiting for a process to take the run" : "Computing the selectivity tests";
  return (
    <Card>
      <div data-testid="run-progress">
        <div className="flex items-baseline justify-between gap-3 text-sm">
          <span className="inline-flex items-center gap-2 font-medium text-stone-800">
            <Spinner className="text-accent-600" />
            {label}
          </span>
          <span className="text-stone-500 tabular-nums">{percent}%</span>
        </div>
        <div
          role="progressbar"
          aria-label={label}
          aria-valuemin={0}
          aria-valuemax={100}
          aria-valuenow={percent}
          aria-valuetext={`${percent}%${run.progressNote ? `: ${run.progressNote}` : ""}`}
          className="mt-2 h-2.5 overflow-hidden rounded-full bg-stone-200"
        >
          <div className="h-full rounded-full bg-accent-600 transition-[width] duration-500" style={{ width: `${Math.max(percent, 2)}%` }} />
        </div>
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
