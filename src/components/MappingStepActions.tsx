import { Button } from "./Button";

/**
 * The foot of every upload's mapping step (trait table, occurrences, modern list): back to the
 * file choice, or check every row with the mapping as it stands (the form's submit).
 */
export function MappingStepActions({ onStartOver, checking }: { onStartOver: () => void; checking: boolean }) {
  return (
    <div className="flex flex-col-reverse gap-3 border-t border-stone-100 pt-4 sm:flex-row sm:justify-between">
      <Button variant="ghost" onClick={onStartOver} disabled={checking}>
        Start over with another file
      </Button>
      <Button type="submit" busy={checking}>
        Check every row
      </Button>
    </div>
  );
}
