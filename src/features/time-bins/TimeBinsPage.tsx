// The study's own time bins: a table edited in place (or filled from a CSV file), checked with the
// same schema the server uses, saved whole. Interval names in the trait table, its imports and the
// occurrence uploads are read through these bins first, then through the ICS chart.
import { useMemo, useState } from "react";
import { can, ROLE_LABELS } from "@shared/roles";
import { TIME_BIN_CSV_MAX_BYTES, TIME_BIN_CSV_MAX_LABEL, TIME_BINS_MAX, timeBinSetSchema, type TimeBin, type TimeBinCsv } from "@shared/schemas/timeBins";
import { binsShadowingChart, INTERVAL_RESOLUTION_ORDER } from "@shared/timebins/intervalLookup";
import { Button } from "../../components/Button";
import { Card } from "../../components/Card";
import { CsvUploadForm } from "../../components/CsvUploadForm";
import { EmptyState } from "../../components/EmptyState";
import { ErrorState } from "../../components/ErrorState";
import { controlClasses } from "../../components/Field";
import { LoadingState } from "../../components/LoadingState";
import { FormError, Notice } from "../../components/Notice";
import { PageHeader } from "../../components/PageHeader";
import { ProblemTable } from "../../components/ProblemTable";
import { TextLink } from "../../components/TextLink";
import { useToast } from "../../components/Toast";
import { ApiError, errorMessage } from "../../lib/api";
import { useCurrentStudy } from "../../lib/currentStudy";
import { formatDate, pluralize } from "../../lib/format";
import { issuesToFieldErrors, type FieldErrors } from "../../lib/forms";
import { useTimeBins } from "../../lib/queries/timeBins";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { cx } from "../../lib/cx";
import { useReadTimeBinsCsv, useSaveTimeBins } from "./api";

/** A bin as typed: every cell is text until the set is checked. */
interface DraftBin {
  key: number;
  name: string;
  baseMa: string;
  topMa: string;
  chartUnit: string;
}
type DraftField = "name" | "baseMa" | "topMa" | "chartUnit";

let nextKey = 1;
const draftOf = (bin: Pick<TimeBin, "name" | "chartUnit"> & { baseMa: number | null; topMa: number | null }): DraftBin => ({
  key: nextKey++,
  name: bin.name,
  baseMa: bin.baseMa === null ? "" : String(bin.baseMa),
  topMa: bin.topMa === null ? "" : String(bin.topMa),
  chartUnit: bin.chartUnit ?? "",
});
/** A typed age: a decimal comma is read as a point; an empty cell is no number (the schema says so). */
const ageOf = (text: string) => (text.trim() === "" ? undefined : Number(text.trim().replace(",", ".")));
const toInput = (rows: DraftBin[]) => ({
  bins: rows.map((r) => ({ name: r.name, baseMa: ageOf(r.baseMa), topMa: ageOf(r.topMa), chartUnit: r.chartUnit.trim() === "" ? null : r.chartUnit })),
});
const sameDraft = (a: DraftBin[], b: DraftBin[]) =>
  a.length === b.length && a.every((r, i) => r.name === b[i]!.name && r.baseMa === b[i]!.baseMa && r.topMa === b[i]!.topMa && r.chartUnit === b[i]!.chartUnit);

const COLUMNS: Array<{ field: DraftField; label: string; hint: string; width: string; numeric?: boolean }> = [
  { field: "name", label: "Name", hint: "A regional stage or a slice number", width: "min-w-40" },
  { field: "baseMa", label: "Base (Ma)", hint: "Older limit", width: "w-32", numeric: true },
  { field: "topMa", label: "Top (Ma)", hint: "Younger limit", width: "w-32", numeric: true },
  { field: "chartUnit", label: "Tied to chart unit", hint: "Optional, e.g. Katian", width: "min-w-40" },
];

export function TimeBinsPage() {
  const study = useCurrentStudy();
  useDocumentTitle(`Time bins · ${study.name}`);
  const bins = useTimeBins(study.id);
  const canEdit = can(study.role, "timeBins.edit");
  const save = useSaveTimeBins(study.id);
  const readCsv = useReadTimeBinsCsv(study.id);
  const toast = useToast();

  const saved = useMemo(() => (bins.data?.bins ?? []).map(draftOf), [bins.data]);
  const [rows, setRows] = useState<DraftBin[] | null>(null);
  const [errors, setErrors] = useState<FieldErrors>({});
  const [fromFile, setFromFile] = useState<TimeBinCsv | null>(null);
  const [uploading, setUploading] = useState(false);
  const draft = rows ?? saved;
  const changed = rows !== null && !sameDraft(rows, saved);

  function edit(index: number, field: DraftField, value: string) {
    setRows(draft.map((r, i) => (i === index ? { ...r, [field]: value } : r)));
    setErrors((current) => {
      const next = { ...current };
      delete next[`bins.${index}.${field}`];
      return next;
    });
  }
  function addBin() {
    const last = draft.at(-1);
    setRows([...draft, draftOf({ name: "", baseMa: last ? ageOf(last.topMa) ?? null : null, topMa: null, chartUnit: null })]);
  }
  function removeBin(index: number) {
    setRows(draft.filter((_, i) => i !== index));
    setErrors({});
  }
  function sortOldestFirst() {
    setRows([...draft].sort((a, b) => (ageOf(b.baseMa) ?? -Infinity) - (ageOf(a.baseMa) ?? -Infinity)));
    setErrors({});
  }
  function discard() {
    setRows(null);
    setErrors({});
    setFromFile(null);
    save.reset();
  }
  function submit() {
    const checked = timeBinSetSchema.safeParse(toInput(draft));
    if (!checked.success) {
      setErrors(issuesToFieldErrors(checked.error));
      return;
    }
    save.mutate(checked.data, {
      onSuccess: (list) => {
        setRows(null);
        setErrors({});
        setFromFile(null);
        toast.show(list.bins.length ? `${pluralize(list.bins.length, "time bin")} saved.` : "The study's time bins were removed.", "success");
      },
      // A server refusal names fields as bins.<index>.<field>, as the schema does here.
      onError: (error) => {
        if (error instanceof ApiError && Object.keys(error.fields).length) setErrors(error.fields);
      },
    });
  }

  const errorCount = Object.keys(errors).length;
  const shadowed = binsShadowingChart(draft.map((r) => ({ name: r.name, baseMa: 0, topMa: 0 })).filter((b) => b.name.trim()));

  return (
    <>
      <PageHeader
        eyebrow={study.name}
        title="Time bins"
        description="This study's own intervals — regional stages, numbered time slices — with their ages. Their names (or numbers) are accepted wherever an interval name is: the trait table's first and last appearances, its imports and the occurrence uploads."
        actions={<TextLink to={`/studies/${study.id}/codebook`}>Back to the codebook</TextLink>}
      />

      <Notice title="How an interval name is read" className="mb-6">
        <p>{bins.data?.resolutionOrder ?? INTERVAL_RESOLUTION_ORDER}</p>
        <p className="mt-1 text-sm text-stone-600">
          Changing the bins does not re-date what was already imported: ages are worked out when a file or a value comes in. Import again to re-date.
        </p>
      </Notice>

      {!canEdit && (
        <Notice className="mb-6">
          As {ROLE_LABELS[study.role]} you can read the time bins. Coders and study leads change them.
        </Notice>
      )}

      {bins.isPending && <LoadingState label="Loading the time bins" lines={4} />}
      {bins.isError && <ErrorState error={bins.error} title="The time bins could not be loaded" onRetry={() => void bins.refetch()} />}

      {bins.isSuccess && canEdit && (
        <Card
          title="Fill from a CSV file"
          description="One row per bin, oldest first, with the columns name, base_ma and top_ma, and optionally chart_unit. The file's bins replace the table below for you to check; nothing is saved until you save."
          className="mb-6"
        >
          {uploading ? (
            <CsvUploadForm
              upload={readCsv}
              onUploaded={(result) => {
                setFromFile(result);
                setUploading(false);
                if (result.bins.length) {
                  setRows(result.bins.map(draftOf));
                  setErrors({});
                }
              }}
              formLabel="Upload time bins"
              fieldLabel="CSV file of time bins"
              hint={`Comma, semicolon or tab separated; at most ${TIME_BIN_CSV_MAX_LABEL}.`}
              missingFile="Choose a CSV file of time bins"
              maxBytes={TIME_BIN_CSV_MAX_BYTES}
              maxLabel={TIME_BIN_CSV_MAX_LABEL}
              submitLabel="Read the file"
              onCancel={() => setUploading(false)}
            />
          ) : (
            <Button variant="secondary" onClick={() => setUploading(true)}>
              Choose a CSV file…
            </Button>
          )}
          {fromFile && (
            <div className="mt-4 space-y-3">
              {fromFile.problems.length === 0 ? (
                <Notice tone="success">
                  {pluralize(fromFile.bins.length, "bin")} read from {fromFile.fileName} without problems. Check them below and save.
                </Notice>
              ) : (
                <ProblemTable problems={fromFile.problems} problemCount={fromFile.problems.length} invalidRows={new Set(fromFile.problems.map((p) => p.row)).size} />
              )}
            </div>
          )}
        </Card>
      )}

      {bins.isSuccess && draft.length === 0 && (
        <EmptyState
          title="No time bins of this study's own"
          description="Interval names are read from the ICS chart alone. Define bins when your data are dated in regional stages or numbered slices, so that “7” in an interval column means slice 7, not 7 Ma."
          action={canEdit ? <Button onClick={addBin}>Add the first bin</Button> : undefined}
        />
      )}

      {bins.isSuccess && draft.length > 0 && (
        <Card
          title="Bins, oldest first"
          description={`${pluralize(draft.length, "bin")}; at most ${TIME_BINS_MAX}. Bins may touch or leave gaps, never overlap.${bins.data.updatedAt ? ` Last saved ${formatDate(bins.data.updatedAt)}${bins.data.updatedBy ? ` by ${bins.data.updatedBy.name}` : ""}.` : ""}`}
        >
          {shadowed.length > 0 && (
            <Notice tone="warning" className="mb-4">
              {shadowed.map((s) => `“${s.bin}”`).join(", ")} {shadowed.length === 1 ? "is also the name of a unit" : "are also names of units"} of the ICS chart: in this study the bin is used
              wherever that name appears.
            </Notice>
          )}
          <form
            noValidate
            aria-label="Time bins"
            onSubmit={(event) => {
              event.preventDefault();
              submit();
            }}
          >
            <FormError message={save.error && !(save.error instanceof ApiError && Object.keys(save.error.fields).length) ? errorMessage(save.error) : errorCount ? `${pluralize(errorCount, "problem")} in the table: see the marked cells.` : null} />
            <div className="mt-2 overflow-x-auto" role="region" aria-label="Time bins table" tabIndex={0}>
              <table className="min-w-full text-left text-sm">
                <thead className="text-stone-600">
                  <tr>
                    <th scope="col" className="px-2 py-2 font-semibold">
                      #
                    </th>
                    {COLUMNS.map((c) => (
                      <th key={c.field} scope="col" className="px-2 py-2 font-semibold">
                        {c.label}
                        <span className="block text-xs font-normal text-stone-500">{c.hint}</span>
                      </th>
                    ))}
                    {canEdit && (
                      <th scope="col" className="px-2 py-2">
                        <span className="sr-only">Remove</span>
                      </th>
                    )}
                  </tr>
                </thead>
                <tbody className="divide-y divide-stone-100">
                  {draft.map((row, index) => (
                    <tr key={row.key} data-bin-row={index + 1} className="align-top">
                      <td className="px-2 py-2 text-stone-500 tabular-nums">{index + 1}</td>
                      {COLUMNS.map((c) => {
                        const error = errors[`bins.${index}.${c.field}`];
                        const errorId = `bin-${row.key}-${c.field}-error`;
                        return (
                          <td key={c.field} className={cx("px-2 py-1.5", c.width)}>
                            {canEdit ? (
                              <input
                                value={row[c.field]}
                                onChange={(e) => edit(index, c.field, e.target.value)}
                                inputMode={c.numeric ? "decimal" : undefined}
                                aria-label={`${c.label}, bin ${index + 1}`}
                                aria-invalid={error ? true : undefined}
                                aria-describedby={error ? errorId : undefined}
                                className={cx(controlClasses(Boolean(error)), "h-9", c.numeric && "text-right tabular-nums")}
                              />
                            ) : (
                              <span className={cx(c.numeric && "tabular-nums")}>{row[c.field] || "—"}</span>
                            )}
                            {error && (
                              <p id={errorId} className="mt-1 text-xs text-red-700">
                                {error}
                              </p>
                            )}
                          </td>
                        );
                      })}
                      {canEdit && (
                        <td className="px-2 py-1.5">
                          <Button variant="ghost" size="sm" onClick={() => removeBin(index)}>
                            Remove<span className="sr-only"> bin {index + 1}</span>
                          </Button>
                        </td>
                      )}
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            {canEdit && (
              <div className="mt-4 flex flex-wrap items-center gap-3">
                <Button variant="secondary" size="sm" onClick={addBin} disabled={draft.length >= TIME_BINS_MAX}>
                  Add a bin
                </Button>
                <Button variant="ghost" size="sm" onClick={sortOldestFirst}>
                  Sort oldest first
                </Button>
                <div className="ml-auto flex gap-3">
                  {rows !== null && (
                    <Button variant="ghost" onClick={discard} disabled={save.isPending}>
                      Discard changes
                    </Button>
                  )}
                  <Button type="submit" busy={save.isPending} disabled={!changed}>
                    Save time bins
                  </Button>
                </div>
              </div>
            )}
          </form>
        </Card>
      )}

      {bins.isSuccess && canEdit && draft.length === 0 && rows !== null && saved.length > 0 && (
        <div className="mt-4 flex justify-end gap-3">
          <Button variant="ghost" onClick={discard}>
            Discard changes
          </Button>
          <Button busy={save.isPending} onClick={submit}>
            Remove all bins
          </Button>
        </div>
      )}
    </>
  );
}
