import { useState, type FormEvent } from "react";
import { importCommitSchema, type ImportMapping, type ImportPreview, type ImportSummary } from "@shared/schemas/imports";
import type { Trait } from "@shared/schemas/traits";
import { Button } from "../../components/Button";
import { cx } from "../../lib/cx";
import { ProblemTable } from "../../components/ProblemTable";
import { FormError, Notice } from "../../components/Notice";
import { TextField } from "../../components/TextField";
import { ApiError, errorMessage } from "../../lib/api";
import { formatCount, pluralize } from "../../lib/format";
import { useCommitImport, useImportSummary, usePreviewImport } from "./api";
import { ImportChecksPanel, NO_SPELLINGS_CHOSEN, type ChosenSpellings } from "./ImportChecksPanel";
import { fieldLabel, formatImportValue } from "./formatValue";
import { ProgressBar } from "../../components/ProgressBar";

interface PreviewStepProps {
  studyId: string;
  mapping: ImportMapping;
  preview: ImportPreview;
  traits: Map<string, Trait>;
  onBack: () => void;
  onCommitted: (summary: ImportSummary) => void;
}

const ACTION_WORDS = { create: "Adds", update: "Changes", unchanged: "No change" } as const;

/**
 * Step 2 and 3: what the import would do, every problem by row and column, then the commit: all
 * valid rows in one transaction, or nothing. Leaving out invalid rows is an explicit choice.
 */
export function PreviewStep({ studyId, mapping, preview: firstPreview, traits, onBack, onCommitted }: PreviewStepProps) {
  // A choice about similar names makes the preview again; the commit uses the same choice.
  const [preview, setPreview] = useState(firstPreview);
  const [spellings, setSpellings] = useState<ChosenSpellings>(NO_SPELLINGS_CHOSEN);
  const again = usePreviewImport(studyId);
  const { counts } = preview;
  const [skipInvalid, setSkipInvalid] = useState(false);
  const [reason, setReason] = useState("");
  const [choiceError, setChoiceError] = useState<string | null>(null);
  const commit = useCommitImport(studyId);
  const summary = useImportSummary(studyId, preview.import.id, commit.isPending);
  const fileName = preview.import.fileName;

  const refusedProblems =
    commit.error instanceof ApiError && commit.error.code === "import_has_problems"
      ? ((commit.error.body as { problems?: ImportPreview["problems"] })?.problems ?? null)
      : null;
  const problems = refusedProblems ?? preview.problems;

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    if (counts.valid === 0) {
      setChoiceError("No row of this file can be imported. Fix the problems listed above and upload the file again.");
      return;
    }
    if (counts.invalid > 0 && !skipInvalid) {
      setChoiceError(`Tick the box to leave out the ${pluralize(counts.invalid, "invalid row")}, or fix the file and upload it again.`);
      return;
    }
    const parsed = importCommitSchema.safeParse({ mapping, nameMerges: spellings.names, higherTaxonMerges: spellings.higherTaxa, skipInvalid: counts.invalid > 0 && skipInvalid, reason });
    if (!parsed.success) {
      setChoiceError(parsed.error.issues[0]?.message ?? "The import cannot be committed.");
      return;
    }
    commit.mutate({ importId: preview.import.id, input: parsed.data }, { onSuccess: onCommitted });
  }

  const progress = summary.data?.status === "committing" ? summary.data.progress : null;

  return (
    <div className="space-y-6">
      <dl className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-6" aria-label="What this import does">
        {[
          ["Rows", counts.rows],
          ["Valid", counts.valid],
          ["Invalid", counts.invalid],
          ["New taxa", counts.create],
          ["Taxa changed", counts.update],
          ["Unchanged", counts.unchanged],
        ].map(([label, n]) => (
          <div
            key={label}
            className={cx("rounded-lg border px-3 py-2", label === "Invalid" && Number(n) > 0 ? "border-red-200 bg-red-50" : "border-stone-200 bg-stone-50")}
          >
            <dt className="text-sm text-stone-600">{label}</dt>
            <dd className={cx("text-xl font-semibold tabular-nums", label === "Invalid" && Number(n) > 0 ? "text-red-800" : "text-stone-900")}>{formatCount(Number(n))}</dd>
          </div>
        ))}
      </dl>

      {preview.notes.length > 0 && (
        <ul className="list-disc space-y-1 pl-5 text-sm text-stone-600">
          {preview.notes.map((note) => (
            <li key={note}>{note}</li>
          ))}
        </ul>
      )}

      <ImportChecksPanel
        checks={preview.checks}
        merges={spellings}
        busy={again.isPending || commit.isPending}
        onMergesChange={(next) => {
          setChoiceError(null);
          again.mutate({ importId: preview.import.id, mapping, nameMerges: next.names, higherTaxonMerges: next.higherTaxa }, {
            onSuccess: (result) => {
              setSpellings(next);
              setPreview(result);
            },
          });
        }}
      />
      {again.error && <FormError message={`The preview could not be made again: ${errorMessage(again.error)}`} />}

      {problems.length > 0 ? (
        <ProblemTable problems={problems} problemCount={preview.problemCount} invalidRows={counts.invalid} />
      ) : (
        <Notice tone="success">Every row can be read: no problems found.</Notice>
      )}

      {preview.sample.length > 0 && (
        <details className="rounded-lg border border-stone-200">
          <summary className="cursor-pointer px-4 py-2 text-sm font-medium text-stone-700">{preview.sample.length === 1 ? "What the valid row changes" : `What the first ${formatCount(preview.sample.length)} valid rows change`}</summary>
          <div className="max-h-80 overflow-auto border-t border-stone-100">
            <table className="min-w-full text-left text-sm">
              <thead className="sticky top-0 bg-stone-50 text-stone-600">
                <tr>
                  <th scope="col" className="px-3 py-2 font-semibold">Row</th>
                  <th scope="col" className="px-3 py-2 font-semibold">Taxon</th>
                  <th scope="col" className="px-3 py-2 font-semibold">Effect</th>
                  <th scope="col" className="px-3 py-2 font-semibold">Values</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-stone-100">
                {preview.sample.map((s) => (
                  <tr key={s.row} className="align-top">
                    <td className="px-3 py-1.5 tabular-nums">{s.row}</td>
                    <td className="px-3 py-1.5 italic">{s.name}</td>
                    <td className="px-3 py-1.5">{ACTION_WORDS[s.action]}</td>
                    <td className="px-3 py-1.5 text-stone-700">
                      {s.changes
                        .map((c) => {
                          const trait = c.traitId ? traits.get(c.traitId) : undefined;
                          const from = formatImportValue(c.from, trait);
                          const to = formatImportValue(c.to, trait) ?? "missing";
                          return `${fieldLabel(c.field, c.traitId, traits)}: ${from ? `${from} → ` : ""}${to}`;
                        })
                        .join("; ") || "—"}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </details>
      )}

      <form noValidate onSubmit={submit} className="space-y-4 rounded-lg border border-stone-200 bg-stone-50/70 px-4 py-4" aria-label="Commit the import">
        <h3 className="font-semibold text-stone-900">Commit</h3>
        <p className="text-sm text-stone-600">The valid rows are written in one transaction: all of them, or nothing. Each row is one recorded coding decision, and the whole import can be reverted later.</p>
        <FormError message={commit.error ? errorMessage(commit.error) : choiceError} />
        {counts.invalid > 0 && (
          <label className="flex items-start gap-3 text-[15px] text-stone-800">
            <input
              type="checkbox"
              className="mt-1 size-4 accent-accent-600"
              checked={skipInvalid}
              onChange={(e) => {
                setSkipInvalid(e.target.checked);
                setChoiceError(null);
              }}
            />
            <span>
              Leave out the {pluralize(counts.invalid, "invalid row")} listed above and import the {pluralize(counts.valid, "valid row")}.
              <span className="block text-sm text-stone-500">Otherwise fix the file and upload it again; nothing is written until then.</span>
            </span>
          </label>
        )}
        <TextField
          label="Reason"
          optional
          hint="Recorded on every coding decision of this import."
          placeholder={`Imported from ${fileName}`}
          value={reason}
          onChange={(e) => setReason(e.target.value)}
        />
        {commit.isPending && <ProgressBar label={`Writing ${pluralize(counts.valid, "row")}`} value={progress} detail={progress === null ? "Starting…" : undefined} />}
        <div className="flex flex-col-reverse gap-3 sm:flex-row sm:justify-between">
          <Button variant="ghost" onClick={onBack} disabled={commit.isPending}>
            Back to the mapping
          </Button>
          <Button type="submit" busy={commit.isPending}>
            Import {pluralize(counts.valid, "row")}
          </Button>
        </div>
      </form>
    </div>
  );
}
