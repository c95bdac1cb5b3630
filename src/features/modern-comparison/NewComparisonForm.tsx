import { useState, type FormEvent } from "react";
import { useNavigate } from "react-router-dom";
import { comparisonParamsSchema, DEFAULT_WORTH_A_LOOK_MIN } from "@shared/schemas/comparisons";
import type { ModernListSummary } from "@shared/schemas/modernLists";
import type { RunSummary } from "@shared/schemas/runs";
import type { MainBoundary } from "@shared/schemas/studies";
import { defaultRunAndBoundary } from "./defaultRun";
import { Button } from "../../components/Button";
import { FormError } from "../../components/Notice";
import { Select } from "../../components/Select";
import { TextField } from "../../components/TextField";
import { ApiError, errorMessage } from "../../lib/api";
import { issuesToFieldErrors, type FieldErrors } from "../../lib/forms";
import { formatDate, pluralize } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useRun } from "../../lib/queries/runs";
import { useCreateComparison } from "./api";
import { ProgressBar } from "../../components/ProgressBar";

const LEVELS = [
  { value: "0.9", label: "90%" },
  { value: "0.95", label: "95%" },
  { value: "0.99", label: "99%" },
];

/** Choose a list (with its saved crosswalk), a finished run and one of its boundaries; score, compare and save. */
export function NewComparisonForm({ studyId, lists, runs, mainBoundary }: { studyId: string; lists: ModernListSummary[]; runs: RunSummary[]; mainBoundary: MainBoundary | null }) {
  const navigate = useNavigate();
  const ready = lists.filter((l) => l.crosswalkSaved);
  const [listId, setListId] = useState(ready[0]?.id ?? "");
  const [initial] = useState(() => defaultRunAndBoundary(runs, mainBoundary));
  const [runId, setRunId] = useState(initial.runId);
  const [boundaryIndex, setBoundaryIndex] = useState(String(initial.boundaryIndex));
  const [name, setName] = useState("");
  const [worthALookMin, setWorthALookMin] = useState(String(DEFAULT_WORTH_A_LOOK_MIN));
  const [level, setLevel] = useState("0.95");
  const [errors, setErrors] = useState<FieldErrors>({});
  const run = useRun(studyId, runId || null);
  const create = useCreateComparison(studyId);
  const boundaries = run.data?.results?.boundaries ?? [];
  const list = ready.find((l) => l.id === listId);
  const chosenRun = runs.find((r) => r.id === runId);
  const suggestedName = list && chosenRun ? `${chosenRun.name} × ${list.name}`.slice(0, 120) : "";

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const parsed = comparisonParamsSchema.safeParse({
      name: name.trim() || suggestedName,
      listId,
      runId,
      boundaryIndex: Number(boundaryIndex),
      worthALookMin: worthALookMin.trim() === "" ? undefined : Number(worthALookMin.replace(",", ".")),
      level: Number(level),
    });
    if (!parsed.success) return setErrors(issuesToFieldErrors(parsed.error));
    setErrors({});
    create.mutate(parsed.data, {
      onSuccess: (created) => navigate(`${paths.study(studyId)}/modern-comparison/comparisons/${created.id}`),
      onError: (error) => {
        if (error instanceof ApiError) setErrors(error.fields);
      },
    });
  }

  return (
    <form noValidate onSubmit={submit} className="space-y-5" aria-label="Compare a list with a run">
      <FormError message={create.error ? errorMessage(create.error) : null} />
      <div className="grid gap-4 sm:grid-cols-2">
        <Select
          label="Modern list"
          options={ready.map((l) => ({ value: l.id, label: `${l.name} (${pluralize(l.speciesCount, "species", "species")})` }))}
          value={listId}
          onChange={(e) => setListId(e.target.value)}
          error={errors.listId ?? errors.crosswalk}
          hint="Lists with a saved crosswalk."
        />
        <Select
          label="Run"
          options={runs.map((r) => ({ value: r.id, label: `${r.name} · ${formatDate(r.createdAt)}` }))}
          value={runId}
          onChange={(e) => {
            setRunId(e.target.value);
            const next = runs.find((r) => r.id === e.target.value);
            setBoundaryIndex(String(next ? defaultRunAndBoundary([next], mainBoundary).boundaryIndex : 0));
          }}
          error={errors.runId}
          hint="Finished runs; its fitted model scores every species."
        />
        <Select
          label="Boundary of the run"
          options={
            run.isPending
              ? [{ value: "0", label: "Loading the run…" }]
              : boundaries.map((b, i) => ({ value: String(i), label: b.result.model ? b.label : `${b.label} (no fitted model)`, disabled: !b.result.model }))
          }
          value={boundaryIndex}
          onChange={(e) => setBoundaryIndex(e.target.value)}
          error={errors.boundaryIndex ?? (run.isError ? errorMessage(run.error) : undefined)}
          hint="The crisis whose selectivity is held against today's list."
        />
        <TextField label="Name of the comparison" value={name} placeholder={suggestedName} onChange={(e) => setName(e.target.value)} error={errors.name} maxLength={120} />
        <TextField
          label="Worth a look from"
          inputMode="decimal"
          value={worthALookMin}
          onChange={(e) => setWorthALookMin(e.target.value)}
          error={errors.worthALookMin}
          hint="Species listed LC or DD with a predicted probability at least this high are listed as worth a look (0.5: more likely than not to have died out in the past crisis)."
        />
        <Select label="Confidence level" options={LEVELS} value={level} onChange={(e) => setLevel(e.target.value)} error={errors.level} />
      </div>
      {create.isPending && <ProgressBar label="Scoring every species and comparing" value={null} detail="Working…" />}
      <div className="flex justify-end">
        <Button type="submit" busy={create.isPending} disabled={!listId || !runId}>
          Compare and save
        </Button>
      </div>
    </form>
  );
}
