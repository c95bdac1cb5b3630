import { useId } from "react";
import type { ImportChecks, NameMerges, SimilarNames } from "@shared/schemas/importChecks";
import { Notice } from "../../components/Notice";
import { agesWriter, formatCount, pluralize } from "../../lib/format";

/** "485.4 to 443.8 Ma", both ends written alike. */
function spanAges(span: { oldestMa: number; youngestMa: number }): string {
  const ages = agesWriter([span.oldestMa, span.youngestMa]);
  return `${ages.number(span.oldestMa)} to ${ages.ma(span.youngestMa)}`;
}

/** Spellings chosen so far (spelling -> the one to read it as), of taxon names and of higher taxa. */
export interface ChosenSpellings {
  names: NameMerges;
  higherTaxa: NameMerges;
}

export const NO_SPELLINGS_CHOSEN: ChosenSpellings = { names: {}, higherTaxa: {} };

interface ImportChecksPanelProps {
  checks: ImportChecks;
  merges: ChosenSpellings;
  /** A new choice: the preview is made again with it. */
  onMergesChange: (merges: ChosenSpellings) => void;
  /** A new preview is on its way: the choices wait. */
  busy: boolean;
}

const rowsText = (rows: number[], total: number) => `${rows.length === 1 && total === 1 ? "row" : "rows"} ${rows.join(", ")}${total > rows.length ? ` and ${formatCount(total - rows.length)} more` : ""}`;

/** The merges with one group's spellings read as `into` (null: kept apart). */
function withChoice(merges: NameMerges, group: SimilarNames, into: string | null): NameMerges {
  const next = { ...merges };
  for (const s of group.spellings) delete next[s.name];
  if (into !== null) for (const s of group.spellings) if (s.name !== into) next[s.name] = into;
  return next;
}

function SimilarNameGroup({
  group,
  merges,
  onMergesChange,
  busy,
  what,
}: {
  group: SimilarNames;
  merges: NameMerges;
  onMergesChange: (merges: NameMerges) => void;
  busy: boolean;
  what: { one: string; apart: string; inStudy: string };
}) {
  const name = useId();
  const choice = group.mergedInto;
  return (
    <fieldset className="rounded-lg border border-stone-200 px-3 py-2" disabled={busy}>
      <legend className="px-1 text-sm font-medium text-stone-800">
        {group.spellings.map((s) => `"${s.name}"`).join(", ")}
      </legend>
      <ul className="mb-2 text-sm text-stone-600">
        {group.spellings.map((s) => (
          <li key={s.name}>
            <span className="italic text-stone-800">{s.name}</span>:{" "}
            {[s.inStudy ? what.inStudy : null, s.fileRows ? `in this file on ${rowsText(s.firstRows, s.fileRows)}` : null].filter(Boolean).join("; ")}
          </li>
        ))}
      </ul>
      <div className="flex flex-wrap gap-x-5 gap-y-1 text-[15px] text-stone-800">
        <label className="flex items-center gap-2">
          <input type="radio" name={name} className="size-4 accent-accent-600" checked={choice === null} onChange={() => onMergesChange(withChoice(merges, group, null))} />
          {what.apart}
        </label>
        {group.spellings.map((s) => (
          <label key={s.name} className="flex items-center gap-2">
            <input type="radio" name={name} className="size-4 accent-accent-600" checked={choice === s.name} onChange={() => onMergesChange(withChoice(merges, group, s.name))} />
            {what.one}, spelt <span className={what.one === "One taxon" ? "italic" : undefined}>{s.name}</span>
          </label>
        ))}
      </div>
    </fieldset>
  );
}

/**
 * What a preview found beside its row errors: age warnings by row and column, cells read as missing
 * through the study's tokens, names that differ only by case, spacing or punctuation (with the
 * choice to read them as one), and qualified higher taxa. None of it blocks the commit.
 */
export function ImportChecksPanel({ checks, merges, onMergesChange, busy }: ImportChecksPanelProps) {
  const missingTotal = checks.missingRead.reduce((n, m) => n + m.count, 0);
  return (
    <section aria-label="Warnings and name checks" className="space-y-4">
      {checks.warningCount > 0 ? (
        <Notice tone="warning" title={`${pluralize(checks.warningCount, "age looks", "ages look")} implausible`}>
          <p className="mb-2">
            Compared with {checks.ageSpan ? `${spanAges(checks.ageSpan)} (${checks.ageSpan.source === "study" ? "the ranges of the study's taxa" : "the middle half of this file's ages"})` : "the study's span"}.
            These are warnings: the rows can still be committed. Rows are numbered as a spreadsheet shows them (the header is row 1).
          </p>
          <div className="max-h-64 overflow-auto rounded border border-amber-200 bg-white">
            <table className="min-w-full text-left text-sm" aria-label="Age warnings">
              <thead className="sticky top-0 bg-amber-50 text-stone-700">
                <tr>
                  <th scope="col" className="px-3 py-1.5 font-semibold">Row</th>
                  <th scope="col" className="px-3 py-1.5 font-semibold">Column</th>
                  <th scope="col" className="px-3 py-1.5 font-semibold">Taxon</th>
                  <th scope="col" className="px-3 py-1.5 font-semibold">Warning</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-stone-100">
                {checks.warnings.map((w) => (
                  <tr key={`${w.row}-${w.column}`} className="align-top">
                    <td className="px-3 py-1 tabular-nums">{w.row}</td>
                    <td className="px-3 py-1">{w.column}</td>
                    <td className="px-3 py-1 italic">{w.taxon}</td>
                    <td className="px-3 py-1 text-stone-700">{w.message}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          {checks.warningCount > checks.warnings.length && <p className="mt-1 text-sm">The first {formatCount(checks.warnings.length)} of {formatCount(checks.warningCount)} are listed.</p>}
        </Notice>
      ) : checks.ageSpan ? (
        <p className="text-sm text-stone-600">
          Every age given in Ma lies near {spanAges(checks.ageSpan)} ({checks.ageSpan.source === "study" ? "the study's ranges" : "the middle half of this file's ages"}).
        </p>
      ) : null}

      {missingTotal > 0 && (
        <Notice title={`${pluralize(missingTotal, "cell")} read as missing`}>
          <p className="mb-1">These cells hold one of the study&apos;s missing-value tokens, so they are read as empty (a taxon keeps what it holds), never as a value or a state:</p>
          <ul className="list-disc pl-5 text-sm">
            {checks.missingRead.map((m) => (
              <li key={`${m.column}-${m.token}`}>
                Column <span className="font-medium">{m.column}</span>: <code className="rounded bg-stone-100 px-1">{m.token}</code> {pluralize(m.count, "time")} ({rowsText(m.firstRows, m.count)})
              </li>
            ))}
          </ul>
        </Notice>
      )}

      {checks.similarNames.length > 0 && (
        <Notice tone="warning" title={`${pluralize(checks.similarNames.length, "name is", "names are")} written more than one way`}>
          <p className="mb-2">
            These spellings differ only by case, spaces or punctuation. Kept apart they are separate taxa (one may become a survivor and the other a victim). Choose for each; the preview is
            made again with your choice, and the commit uses it.
          </p>
          <div className="space-y-2">
            {checks.similarNames.map((g) => (
              <SimilarNameGroup
                key={g.key}
                group={g}
                merges={merges.names}
                onMergesChange={(names) => onMergesChange({ ...merges, names })}
                busy={busy}
                what={{ one: "One taxon", apart: "Keep apart (different taxa)", inStudy: "a taxon of the study" }}
              />
            ))}
          </div>
        </Notice>
      )}

      {checks.similarHigherTaxa.length > 0 && (
        <Notice tone="warning" title={`${pluralize(checks.similarHigherTaxa.length, "higher taxon is", "higher taxa are")} written more than one way`}>
          <p className="mb-2">
            Kept apart, each spelling is a clade of its own in clade-adjusted results. Choose for each; qualified names (such as &quot;Anavelidae?&quot;) are not offered, as they differ on purpose.
          </p>
          <div className="space-y-2">
            {checks.similarHigherTaxa.map((g) => (
              <SimilarNameGroup
                key={g.key}
                group={g}
                merges={merges.higherTaxa}
                onMergesChange={(higherTaxa) => onMergesChange({ ...merges, higherTaxa })}
                busy={busy}
                what={{ one: "One clade", apart: "Keep apart (different clades)", inStudy: "a higher taxon of the study" }}
              />
            ))}
          </div>
        </Notice>
      )}

      {checks.qualifiedHigherTaxa.length > 0 && (
        <Notice title={`${pluralize(checks.qualifiedHigherTaxa.length, "qualified higher taxon", "qualified higher taxa")}`}>
          <p className="mb-1">Kept as written and marked as qualified wherever the higher taxon shows. In clade-adjusted results each stays a clade of its own, not pooled into the clade it names.</p>
          <ul className="list-disc pl-5 text-sm">
            {checks.qualifiedHigherTaxa.map((q) => (
              <li key={q.name}>
                <span className="font-medium">{q.name}</span> ({q.qualifier} {q.base}): {pluralize(q.rows, "row")}, first on row {q.firstRow}
              </li>
            ))}
          </ul>
        </Notice>
      )}
    </section>
  );
}
