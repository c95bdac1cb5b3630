import type { RunSummary } from "@shared/schemas/runs";
import type { MainBoundary } from "@shared/schemas/studies";

/**
 * The run and boundary a comparison starts from: the newest run that tests the study's main boundary,
 * else the newest run that names a crisis, else the newest run; within it the main boundary, else its crisis.
 */
export function defaultRunAndBoundary(runs: RunSummary[], main: MainBoundary | null): { runId: string; boundaryIndex: number } {
  const at = (run: RunSummary) => (main ? run.params.boundaries.findIndex((b) => Math.abs(b.boundaryMa - main.boundaryMa) < 1e-9) : -1);
  const testsMain = runs.find((r) => at(r) >= 0);
  if (testsMain) return { runId: testsMain.id, boundaryIndex: at(testsMain) };
  const withCrisis = runs.find((r) => r.params.crisisBoundary !== undefined);
  const run = withCrisis ?? runs[0];
  return { runId: run?.id ?? "", boundaryIndex: run?.params.crisisBoundary ?? 0 };
}
