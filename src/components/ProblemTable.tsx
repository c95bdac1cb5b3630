import { useId } from "react";
import { formatCount, pluralize } from "../lib/format";

export interface RowProblem {
  row: number;
  column?: string | null;
  message: string;
}

interface ProblemTableProps {
  /** The problems listed (the server may send only the first ones). */
  problems: readonly RowProblem[];
  /** How many problems the file has in all. */
  problemCount: number;
  /** How many rows have at least one. */
  invalidRows: number;
}

/** Every problem of an uploaded file by row and column, as a region named by its count. */
export function ProblemTable({ problems, problemCount, invalidRows }: ProblemTableProps) {
  const headingId = useId();
  return (
    <section aria-labelledby={headingId}>
      <h3 id={headingId} className="font-semibold text-red-800">
        {pluralize(problemCount, "problem")} in {pluralize(invalidRows, "row")}
      </h3>
      {problemCount > problems.length && <p className="text-sm text-stone-600">The first {formatCount(problems.length)} are listed.</p>}
      <div className="mt-2 max-h-80 overflow-auto rounded-lg border border-red-200">
        <table className="min-w-full text-left text-sm">
          <caption className="sr-only">Problems by row and column</caption>
          <thead className="sticky top-0 bg-red-50 text-red-900">
            <tr>
              <th scope="col" className="px-3 py-2 font-semibold">Row</th>
              <th scope="col" className="px-3 py-2 font-semibold">Column</th>
              <th scope="col" className="px-3 py-2 font-semibold">Problem</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-red-100 bg-white">
            {problems.map((p, i) => (
              <tr key={`${p.row}-${p.column}-${i}`} data-problem-row={p.row}>
                <td className="px-3 py-1.5 tabular-nums">{p.row}</td>
                <td className="px-3 py-1.5 font-medium whitespace-nowrap">{p.column ?? "—"}</td>
                <td className="px-3 py-1.5 text-stone-800">{p.message}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </section>
  );
}
