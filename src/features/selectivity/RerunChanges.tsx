import type { RunDiff } from "@shared/schemas/runDiff";
import { Card } from "../../components/Card";
import { ErrorState } from "../../components/ErrorState";
import { cx } from "../../lib/cx";
import { LoadingState } from "../../components/LoadingState";
import { TextLink } from "../../components/TextLink";
import { formatCount, formatDateTime } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useRunDiff } from "../../lib/queries/runs";
import { formatEstimate, formatP } from "./words";
import { ChangedParameters } from "../../components/ChangedParameters";

type ChangedTrait = RunDiff["boundaries"][number]["traits"][number] & { boundary: string };

const arrow = (base: string, run: string) => (base === run ? run : `${base} → ${run}`);

/** A re-run on today's data set against the run it repeats: did the data change, and which numbers moved. */
export function RerunChanges({ studyId, runId, baseId }: { studyId: string; runId: string; baseId: string }) {
  const diff = useRunDiff(studyId, runId, baseId);
  const compareLink = `${paths.study(studyId)}/runs/compare?base=${encodeURIComponent(baseId)}&run=${encodeURIComponent(runId)}`;

  return (
    <Card
      title="What changed since the run it repeats"
      description="This run re-ran the parameters of an earlier run on the data of its day."
      actions={<TextLink to={compareLink}>Full side-by-side comparison</TextLink>}
    >
      {diff.isPending && <LoadingState label="Comparing with the earlier run" lines={2} />}
      {diff.isError && <ErrorState error={diff.error} title="The two runs could not be compared" onRetry={() => void diff.refetch()} />}
      {diff.data && <DiffSummary diff={diff.data} />}
    </Card>
  );
}

function DiffSummary({ diff }: { diff: RunDiff }) {
  const changed: ChangedTrait[] = diff.boundaries.flatMap((b) => b.traits.filter((t) => t.changed).map((t) => ({ ...t, boundary: b.label })));
  const rowChange = diff.rowCount.change;
  // The verdicts of the run's checks (sampling, robustness, crisis against background) that moved.
  const at = (label: string) => (diff.boundaries.length > 1 ? ` (at ${label})` : "");
  const verdicts = [...diff.boundaries.flatMap((b) => [...b.sampling.changes, ...b.robustness.changes].map((c) => `${c}${at(b.label)}`)), ...diff.crisis.changes];
  return (
    <div className="space-y-3 text-[15px]" data-testid="rerun-changes">
      <p className={cx("rounded-lg px-4 py-3", diff.hashChanged ? "border border-caution-200 bg-caution-50 text-stone-800" : "bg-stone-50 text-stone-700")}>
        {diff.hashChanged ? (
          <>
            <span className="font-semibold">The data changed</span> since “{diff.base.name}” ({formatDateTime(diff.base.createdAt)}): data hash{" "}
            <code className="font-mono text-sm">{diff.base.dataHashShort}</code> → <code className="font-mono text-sm">{diff.run.dataHashShort}</code>
            {rowChange !== null && rowChange !== 0 && `, ${rowChange > 0 ? "+" : "−"}${formatCount(Math.abs(rowChange))} taxon rows`}.
          </>
        ) : (
          <>
            <span className="font-semibold">Same data</span> as “{diff.base.name}” ({formatDateTime(diff.base.createdAt)}): the data hash{" "}
            <code className="font-mono text-sm">{diff.run.dataHashShort}</code> is unchanged.
          </>
        )}
      </p>
      {diff.paramsChanged.length > 0 && (
        <ChangedParameters changes={diff.paramsChanged} />
      )}
      {changed.length === 0 && verdicts.length === 0 ? (
        <p className="text-stone-700">No test result, odds ratio or verdict moved.</p>
      ) : changed.length === 0 ? null : (
        <div>
          <p className="font-medium text-stone-900">Results that moved</p>
          <ul className="mt-1 space-y-1 text-stone-700">
            {changed.map((t) => (
              <li key={`${t.boundary}:${t.key}`}>
                <span className="font-medium text-stone-900">{t.label}</span>
                {diff.boundaries.length > 1 && <span className="text-stone-500"> at {t.boundary}</span>}: adjusted p {arrow(formatP(t.adjustedPValue.base), formatP(t.adjustedPValue.run))}
                {t.contrasts
                  .filter((c) => c.changed)
                  .map((c) => `; ${c.contrast}: crude odds ratio ${arrow(formatEstimate(c.crudeOddsRatio.base), formatEstimate(c.crudeOddsRatio.run))}`)
                  .join("")}
              </li>
            ))}
          </ul>
        </div>
      )}
      {verdicts.length > 0 && (
        <div data-testid="rerun-verdicts">
          <p className="font-medium text-stone-900">Verdicts that changed</p>
          <ul className="mt-1 list-disc space-y-1 pl-5 text-stone-700">
            {verdicts.map((v) => (
              <li key={v}>{v}</li>
            ))}
          </ul>
        </div>
      )}
    </div>
  );
}
