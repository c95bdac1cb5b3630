/** The parameters that differ between two runs, one per line (from a run diff's `paramsChanged`). */
export function ChangedParameters({ changes }: { changes: string[] }) {
  return (
    <div>
      <p className="font-medium text-stone-900">Parameters that differ</p>
      <ul className="mt-1 list-disc pl-5 text-stone-700">
        {changes.map((change) => (
          <li key={change}>{change}</li>
        ))}
      </ul>
    </div>
  );
}
