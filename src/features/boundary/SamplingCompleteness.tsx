import type { ThreeTimerRowDto } from "@shared/schemas/occurrences";
import { Card } from "../../components/Card";
import { Caution } from "../../components/Caution";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { useThreeTimer } from "./api";

const fixed = (value: number | null) => (value === null ? "—" : value.toFixed(2));

function StageTile({ side, row }: { side: string; row: ThreeTimerRowDto | null }) {
  return (
    <div className="rounded-lg bg-stone-50 px-4 py-3" data-sampling-side={side}>
      <p className="text-sm text-stone-600">{side}</p>
      {row ? (
        <>
          <p className="font-semibold">{row.label}</p>
          <p className="text-2xl font-semibold tabular-nums">{fixed(row.samplingCompleteness)}</p>
          <p className="text-sm text-stone-600 tabular-nums">
            sampling completeness · {row.t3} three-timers, {row.partTimers} part-timers
          </p>
        </>
      ) : (
        <p className="text-sm text-stone-600">No finds reach this stage.</p>
      )}
    </div>
  );
}

/** How completely the stages on both sides of the boundary were sampled (three-timer method), with a warning when low. */
export function SamplingCompleteness({ studyId, boundaryMa }: { studyId: string; boundaryMa: number }) {
  const threeTimer = useThreeTimer(studyId, boundaryMa);
  if (threeTimer.isPending) return <LoadingState label="Reading the occurrences" />;
  if (threeTimer.isError) return <ErrorState error={threeTimer.error} title="Sampling could not be computed" onRetry={() => void threeTimer.refetch()} />;
  const data = threeTimer.data;
  // Without finds there is nothing to say about the boundary: the three-timer chart below shows the empty state.
  if (data.occurrenceCount === 0) return null;
  const boundary = data.boundary;
  return (
    <Card title="Sampling around the boundary" description={data.method}>
      <div className="space-y-4">
        <div className="grid gap-3 sm:grid-cols-2">
          <StageTile side="Stage below the boundary" row={boundary?.below ?? null} />
          <StageTile side="Stage above the boundary" row={boundary?.above ?? null} />
        </div>
        {boundary?.warnings.map((warning) => (
          <Caution key={warning} title="Sampling may distort the outcome">
            {warning}
          </Caution>
        ))}
        <p className="text-sm text-stone-600">Every stage's completeness and three-timer rates are charted below, with the numbers behind them.</p>
      </div>
    </Card>
  );
}
