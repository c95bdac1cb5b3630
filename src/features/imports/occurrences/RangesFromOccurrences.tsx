import { useState, type FormEvent } from "react";
import { can, type StudyRole } from "@shared/roles";
import { rangeDerivationSchema, type RangeDerivation, type RangesApplyResult, type RangesPreview } from "@shared/schemas/occurrences";
import { Button } from "../../../components/Button";
import { Card } from "../../../components/Card";
import { EmptyState } from "../../../components/EmptyState";
import { ErrorState } from "../../../components/ErrorState";
import { LoadingState } from "../../../components/LoadingState";
import { FormError, Notice } from "../../../components/Notice";
import { Select } from "../../../components/Select";
import { TaxonFinds } from "../../../components/TaxonFinds";
import { TextField } from "../../../components/TextField";
import { errorMessage } from "../../../lib/api";
import { formatDateTime, formatMa, pluralize, sharedAgeDecimals } from "../../../lib/format";
import { useApplyRanges, useOccurrenceUploads, usePreviewRanges, useRevertOccurrences, useRevertRanges } from "./api";

/** An age of the preview table, written with the table's decimals. */
const ma = (value: number | null, decimals: number) => (value === null ? "—" : formatMa(value, decimals));

/** The study's occurrence uploads, and ranges derived from their finds: preview old -> new, apply the chosen ones, revert. */
export function RangesFromOccurrences({ studyId, role }: { studyId: string; role: StudyRole }) {
  const uploads = useOccurrenceUploads(studyId);
  const revertUpload = useRevertOccurrences(studyId);
  const preview = usePreviewRanges(studyId);
  // Old and new ranges of the preview table written alike ("94.00 Ma" beside "94.41 Ma").
  const ageDecimals = sharedAgeDecimals([...(preview.data?.changes ?? []).flatMap((c) => [c.oldFadMa, c.oldLadMa, c.fadMa, c.ladMa]), ...(preview.data?.newTaxa ?? []).flatMap((t) => [t.fadMa, t.ladMa])]);
  const apply = useApplyRanges(studyId);
  const revertRanges = useRevertRanges(studyId);
  const [ageMode, setAgeMode] = useState<"bounds" | "midpoint">("bounds");
  const [maxSpan, setMaxSpan] = useState("");
  const [spanError, setSpanError] = useState<string | undefined>();
  const [derivation, setDerivation] = useState<RangeDerivation | null>(null);
  const [chosen, setChosen] = useState<Set<string>>(new Set());
  const [applied, setApplied] = useState<RangesApplyResult | null>(null);
  const [shownTaxon, setShownTaxon] = useState<{ taxon: string; fadMa: number; ladMa: number } | null>(null);
  const canImport = can(role, "imports.run");
  const canEdit = can(role, "taxa.edit");
  const committed = uploads.data?.rows.filter((r) => r.status === "committed") ?? [];

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const parsed = rangeDerivationSchema.safeParse({ ageMode, maxSpanMyr: maxSpan.trim() === "" ? null : Number(maxSpan) });
    if (!parsed.success) {
      setSpanError(parsed.error.issues[0]?.message);
      return;
    }
    setSpanError(undefined);
    setApplied(null);
    preview.mutate(parsed.data, {
      onSuccess: (result: RangesPreview) => {
        setDerivation(parsed.data);
        setChosen(new Set([...result.changes.map((c) => c.taxon), ...result.newTaxa.map((t) => t.taxon)]));
      },
    });
  }

  const toggle = (name: string) => {
    const next = new Set(chosen);
    if (next.has(name)) next.delete(name);
    else next.add(name);
    setChosen(next);
  };

  return (
    <Card title="Ranges from occurrences" description="First and last appearances derived from the study's finds, compared with the trait table before anything changes.">
      <div className="space-y-5">
        {uploads.isPending && <LoadingState label="Loading the occurrence uploads" />}
        {uploads.isError && <ErrorState error={uploads.error} title="The occurrence uploads could not be loaded" onRetry={() => void uploads.refetch()} />}
        {uploads.isSuccess && uploads.data.rows.length === 0 && <EmptyState title="No occurrences yet" description="Upload an occurrence file above; its finds appear here." />}
        {uploads.isSuccess && uploads.data.rows.length > 0 && (
          <ul className="divide-y divide-stone-100 rounded-lg border border-stone-200 text-sm" aria-label="Occurrence uploads">
            {uploads.data.rows.map((u) => (
              <li key={u.id} className="flex flex-wrap items-center justify-between gap-3 px-3 py-2">
                <span>
                  <span className="font-medium">{u.fileName}</span> · {u.status} · {pluralize(u.createdCount, "occurrence")} · {formatDateTime(u.createdAt)}
                </span>
                {canImport && u.status === "committed" && (
                  <Button size="sm" variant="secondary" busy={revertUpload.isPending && revertUpload.variables === u.id} onClick={() => revertUpload.mutate(u.id)}>
                    Remove its occurrences
                  </Button>
                )}
              </li>
            ))}
          </ul>
        )}
        <FormError message={revertUpload.error ? errorMessage(revertUpload.error) : null} />

        {committed.length > 0 && (
          <form noValidate onSubmit={submit} className="grid gap-4 sm:grid-cols-3 sm:items-end" aria-label="Derive ranges">
            <Select
              label="Ages of each find"
              value={ageMode}
              options={[
                { value: "bounds", label: "Widest range the dates allow" },
                { value: "midpoint", label: "Midpoint of each find's dates" },
              ]}
              onChange={(e) => setAgeMode(e.target.value === "midpoint" ? "midpoint" : "bounds")}
            />
            <TextField
              label="Leave out finds dated more coarsely than (Myr)"
              optional
              inputMode="decimal"
              value={maxSpan}
              error={spanError}
              onChange={(e) => setMaxSpan(e.target.value)}
            />
            <Button type="submit" busy={preview.isPending}>
              Preview the ranges
            </Button>
          </form>
        )}
        <FormError message={preview.error ? errorMessage(preview.error) : null} />

        {preview.data && derivation && (
          <div className="space-y-4">
            <p className="text-sm text-stone-700">
              From {pluralize(preview.data.occurrenceCount, "occurrence")} of {preview.data.uploads.map((u) => u.fileName).join(", ")}:{" "}
              {pluralize(preview.data.changes.length, "range")} would change, {pluralize(preview.data.newTaxa.length, "new taxon", "new taxa")},{" "}
              {pluralize(preview.data.unchanged, "range")} already match.
              {preview.data.dropped.count > 0 && ` ${pluralize(preview.data.dropped.count, "find")} left out as too coarsely dated.`}
            </p>
            {(preview.data.changes.length > 0 || preview.data.newTaxa.length > 0) && (
              <div className="max-h-96 overflow-auto rounded-lg border border-stone-200">
                <table className="min-w-full text-left text-sm">
                  <caption className="sr-only">Ranges that would change, and new taxa</caption>
                  <thead className="sticky top-0 bg-stone-50 text-stone-600">
                    <tr>
                      <th scope="col" className="px-3 py-2">Apply</th>
                      <th scope="col" className="px-3 py-2">Taxon</th>
                      <th scope="col" className="px-3 py-2">Now</th>
                      <th scope="col" className="px-3 py-2">From the finds</th>
                      <th scope="col" className="px-3 py-2">Finds · collections</th>
                    </tr>
                  </thead>
                  <tbody className="divide-y divide-stone-100">
                    {[...preview.data.changes.map((c) => ({ ...c, isNew: false })), ...preview.data.newTaxa.map((t) => ({ ...t, isNew: true, oldFadMa: null, oldLadMa: null }))].map((r) => (
                      <tr key={r.taxon} data-range-taxon={r.taxon}>
                        <td className="px-3 py-1.5">
                          <input type="checkbox" aria-label={`Apply the range of ${r.taxon}`} checked={chosen.has(r.taxon)} onChange={() => toggle(r.taxon)} disabled={!canEdit} />
                        </td>
                        <td className="px-3 py-1.5 font-medium">
                          <button type="button" className="underline decoration-dotted underline-offset-2" onClick={() => setShownTaxon({ taxon: r.taxon, fadMa: r.fadMa, ladMa: r.ladMa })}>
                            {r.taxon}
                          </button>
                        </td>
                        <td className="px-3 py-1.5 tabular-nums">{r.isNew ? "new taxon" : `${ma(r.oldFadMa, ageDecimals)} – ${ma(r.oldLadMa, ageDecimals)}`}</td>
                        <td className="px-3 py-1.5 tabular-nums">
                          {ma(r.fadMa, ageDecimals)} – {ma(r.ladMa, ageDecimals)}
                        </td>
                        <td className="px-3 py-1.5 tabular-nums">
                          {r.occurrences} · {r.collections}
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            )}
            {shownTaxon && <TaxonFinds studyId={studyId} taxon={shownTaxon.taxon} range={shownTaxon} />}
            {preview.data.withoutOccurrences.length > 0 && (
              <Notice title={`${pluralize(preview.data.withoutOccurrences.length, "taxon", "taxa")} of the table without any occurrence`}>
                {preview.data.withoutOccurrences
                  .slice(0, 20)
                  .map((t) => t.name)
                  .join(", ")}
                {preview.data.withoutOccurrences.length > 20 ? ", …" : ""}. Their ranges stay as they are.
              </Notice>
            )}
            <FormError message={apply.error ? errorMessage(apply.error) : null} />
            {canEdit ? (
              <Button busy={apply.isPending} disabled={chosen.size === 0} onClick={() => apply.mutate({ ...derivation, taxa: [...chosen] }, { onSuccess: setApplied })}>
                Apply {pluralize(chosen.size, "range")}
              </Button>
            ) : (
              <p className="text-sm text-stone-600">Coders and study leads apply ranges.</p>
            )}
          </div>
        )}
        {applied && (
          <Notice tone="success" title="Ranges applied">
            {pluralize(applied.changed, "taxon", "taxa")} changed, {pluralize(applied.created, "taxon", "taxa")} added. Each change is a coding decision: “{applied.reason}”.{" "}
            <Button
              size="sm"
              variant="secondary"
              busy={revertRanges.isPending}
              onClick={() => revertRanges.mutate({ batchId: applied.batchId, reason: "Undo ranges derived from occurrences" }, { onSuccess: () => setApplied(null) })}
            >
              Undo these changes
            </Button>
          </Notice>
        )}
        <FormError message={revertRanges.error ? errorMessage(revertRanges.error) : null} />
      </div>
    </Card>
  );
}
