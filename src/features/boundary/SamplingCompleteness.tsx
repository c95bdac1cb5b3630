import { useQuery } from "@tanstack/react-query";
import type { ThreeTimer, ThreeTimerRowDto } from "@shared/schemas/occurrences";
import { Card } from "../../components/Card";
import { Caution } from "../../components/Caution";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";
import { studyApiPath } from "../../lib/queries/paths";

/** GET /api/studies/:studyId/occurrences/three-timer?boundaryMa: three-timer sampling per stage and at the boundary. */
function useThreeTimer(studyId: string, boundaryMa: number) {
  return useQuery({
    queryKey: [...queryKeys.studies.detail(studyId), "occurrences", "three-timer", boundaryMa] as const,
    queryFn: ({ signal }) => api.get<ThreeTimer>(`${studyApiPath(studyId, "/occurrences/three-timer")}?boundaryMa=${encodeURIComponent(String(boundaryMa))}`, signal),
  });
}

const fixed = (value: number | null, digits = 2) => (value === null ? "—" : value.toFixed(digits));

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
  if (data.occurrenceCount === 0) {
    return (
      <Card title="Sampling around the boundary" description="Needs occurrences: upload the dated finds on the Imports screen to see how well each stage was sampled.">
        <p className="text-sm text-stone-600">No occurrences in this study yet.</p>
      </Card>
    );
  }
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
        <details className="text-sm">
          <summary className="cursor-pointer font-medium">Three-timer counts and rates of every stage</summary>
          <div className="mt-2 max-h-80 overflow-auto rounded-lg border border-stone-200">
            <table className="min-w-full text-left">
              <caption className="sr-only">Three-timer counts and rates per stage, oldest first</caption>
              <thead className="sticky top-0 bg-stone-50 text-stone-600">
                <tr>
                  {["Stage", "Finds", "Taxa", "Three-timers", "Part-timers", "Completeness", "Extinction", "Origination"].map((h) => (
                    <th key={h} scope="col" className="px-3 py-1.5 font-semibold">
                      {h}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody className="divide-y divide-stone-100 tabular-nums">
                {data.stages.map((s) => (
                  <tr key={s.bin}>
                    <td className="px-3 py-1">{s.label}</td>
                    <td className="px-3 py-1">{s.occurrences}</td>
                    <td className="px-3 py-1">{s.sampled}</td>
                    <td className="px-3 py-1">{s.t3}</td>
                    <td className="px-3 py-1">{s.partTimers}</td>
                    <td className="px-3 py-1">{fixed(s.samplingCompleteness)}</td>
                    <td className="px-3 py-1">{fixed(s.extinction, 3)}</td>
                    <td className="px-3 py-1">{fixed(s.origination, 3)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          {data.straddling > 0 && <p className="mt-1 text-stone-600">{data.straddling} finds are dated across a stage limit and count in no stage.</p>}
        </details>
      </div>
    </Card>
  );
}
