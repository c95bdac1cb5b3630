import type { RunPreview } from "@shared/schemas/runs";
import { Card } from "../../components/Card";
import { ErrorState } from "../../components/ErrorState";
import { cx } from "../../lib/cx";
import { LoadingState } from "../../components/LoadingState";
import { formatMa, formatMyr } from "../../components/timescale/ages";
import { ApiError } from "../../lib/api";
import { formatCount } from "../../lib/format";
import { Body, ColHead, HeadRow, ResultTable, td, tdNum } from "./ResultTable";
import { KIND_LABEL } from "./words";

export interface DesignSummaryProps {
  /** Problems the schema found in the set-up; the design waits until there are none. */
  problems: string[];
  preview: { data: RunPreview | undefined; isPending: boolean; isFetching: boolean; isError: boolean; error: unknown; refetch: () => unknown };
  /** False while nothing valid has been asked for. */
  asked: boolean;
}

/** The design in words and numbers before anything is tested: who enters, and who is dropped, per boundary and trait. */
export function DesignSummary({ problems, preview, asked }: DesignSummaryProps) {
  return (
    <Card
      title="4. The design, before running"
      description="Who enters the tests, per boundary and trait. Nothing is tested or stored until you run."
      actions={preview.isFetching && preview.data ? <span className="text-sm text-stone-500">Updating…</span> : undefined}
    >
      <div aria-live="polite" data-testid="design-summary">
        {!asked ? (
          <div className="rounded-lg border border-dashed border-stone-300 px-4 py-5 text-[15px] text-stone-600">
            <p className="font-medium text-stone-800">The design appears here once the set-up is complete.</p>
            {problems.length > 0 && (
              <ul className="mt-2 list-disc space-y-0.5 pl-5 text-sm">
                {problems.map((p) => (
                  <li key={p}>{p}</li>
                ))}
              </ul>
            )}
          </div>
        ) : preview.isError && !(preview.error instanceof ApiError && preview.error.status === 400) ? (
          <ErrorState error={preview.error} title="The design could not be worked out" onRetry={() => void preview.refetch()} />
        ) : preview.isError ? (
          <div className="rounded-lg border border-red-200 bg-red-50/60 px-4 py-3 text-[15px] text-red-900">
            <p className="font-semibold">The set-up does not fit this study</p>
            <p className="mt-1">{(preview.error as ApiError).message}</p>
          </div>
        ) : preview.isPending || !preview.data ? (
          <LoadingState label="Counting survivors and victims" lines={3} />
        ) : (
          <div className={cx("space-y-6 transition-opacity", preview.isFetching && "opacity-70")}>
            {preview.data.boundaries.map((b) => (
              <BoundaryDesign key={`${b.boundaryMa}-${b.windowMyr}`} design={b} />
            ))}
          </div>
        )}
      </div>
    </Card>
  );
}

function BoundaryDesign({ design }: { design: RunPreview["boundaries"][number] }) {
  const notes = design.traits.flatMap((t) => t.notes.map((note) => `${t.label}: ${note}`));
  const atRisk = design.victims + design.survivors;
  return (
    <section aria-label={`Design at ${design.label}`} data-design-boundary={design.boundaryMa}>
      <h3 className="text-[15px] font-semibold text-stone-900">
        {design.label} <span className="font-normal text-stone-600">· {formatMa(design.boundaryMa)}, window {formatMyr(design.windowMyr)}</span>
      </h3>
      <p className="mt-1 text-[15px] leading-relaxed text-stone-700">{design.summary}</p>
      {atRisk === 0 ? (
        <p className="mt-3 rounded-lg border border-caution-200 bg-caution-50 px-4 py-3 text-[15px] text-stone-800">
          No taxon is at risk across this boundary with this window, so there is nothing to test here. Check the ranges on the Boundary screen, or widen the
          window.
        </p>
      ) : (
        <ResultTable caption={`Taxa entering each trait's test at ${design.label}`} className="mt-3" minWidth="40rem">
          <HeadRow>
            <ColHead>Trait</ColHead>
            <ColHead numeric>Enter</ColHead>
            <ColHead numeric>Victims</ColHead>
            <ColHead numeric>Survivors</ColHead>
            <ColHead numeric>Missing</ColHead>
            <ColHead numeric>Unusable</ColHead>
            <ColHead>Reference</ColHead>
          </HeadRow>
          <Body>
            {design.traits.map((t) => (
              <tr key={t.traitId} data-design-trait={t.key}>
                <th scope="row" className={cx(td, "font-medium")}>
                  {t.label}
                  <span className="block text-xs font-normal text-stone-500">
                    {KIND_LABEL[t.kind]}
                    {t.kind === "numeric" && `, ${t.transform === "log10" ? "log10" : "as given"}${t.standardise ? ", per SD" : ""}`}
                  </span>
                </th>
                <td className={tdNum}>{formatCount(t.used)}</td>
                <td className={tdNum}>{formatCount(t.victimsUsed)}</td>
                <td className={tdNum}>{formatCount(t.survivorsUsed)}</td>
                <td className={cx(tdNum, t.droppedMissing > 0 && "font-medium text-caution-700")}>{formatCount(t.droppedMissing)}</td>
                <td className={cx(tdNum, t.droppedInvalid > 0 && "font-medium text-caution-700")}>{formatCount(t.droppedInvalid)}</td>
                <td className={td}>{t.reference === null ? <span className="text-stone-500">—</span> : (t.states.find((s) => s.code === t.reference)?.label ?? t.reference)}</td>
              </tr>
            ))}
          </Body>
        </ResultTable>
      )}
      <p className="mt-2 text-sm text-stone-600">
        {formatCount(design.completeCases)} of {formatCount(atRisk)} taxa at risk have every chosen trait and enter the multiple regression
        {design.overridesApplied > 0 && `; ${formatCount(design.overridesApplied)} outcomes set by hand apply`}.
      </p>
      {notes.length > 0 && (
        <ul className="mt-2 list-disc space-y-0.5 pl-5 text-sm text-stone-600">
          {notes.map((note) => (
            <li key={note}>{note}</li>
          ))}
        </ul>
      )}
    </section>
  );
}
