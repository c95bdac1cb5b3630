/** The first rows of an uploaded file under its headers, so a person can check the column mapping against real cells. */
export function SampleRowsTable({ columns, rows, caption, limit = 5 }: { columns: string[]; rows: string[][]; caption: string; limit?: number }) {
  return (
    <table className="min-w-full text-left text-sm">
      <caption className="sr-only">{caption}</caption>
      <thead className="bg-stone-50 text-stone-600">
        <tr>
          {columns.map((c) => (
            <th key={c} scope="col" className="px-3 py-1.5 font-semibold whitespace-nowrap">
              {c}
            </th>
          ))}
        </tr>
      </thead>
      <tbody className="divide-y divide-stone-100">
        {rows.slice(0, limit).map((cells, i) => (
          <tr key={i}>
            {columns.map((c, j) => (
              <td key={c} className="px-3 py-1.5 whitespace-nowrap text-stone-800">
                {cells[j] ?? ""}
              </td>
            ))}
          </tr>
        ))}
      </tbody>
    </table>
  );
}
