import { useEffect, useId, useMemo, useState, type FormEvent, type ReactNode } from "react";
import { useSearchParams } from "react-router-dom";
import { can, ROLE_LABELS } from "@shared/roles";
import type { Run, RunParams } from "@shared/schemas/runs";
import type { Study } from "@shared/schemas/studies";
import type { Timescale } from "@shared/schemas/timescale";
import type { Trait } from "@shared/schemas/traits";
import { Button, ButtonLink } from "../../components/Button";
import { Card } from "../../components/Card";
import { EmptyState } from "../../components/EmptyState";
import { ErrorState } from "../../components/ErrorState";
import { focusRing } from "../../components/focus";
import { cx } from "../../lib/cx";
import { LoadingState } from "../../components/LoadingState";
import { FormError, Notice } from "../../components/Notice";
import { PageHeader } from "../../components/PageHeader";
import { indexScale, type ScaleIndex } from "../../components/timescale/scaleIndex";
import { TextField } from "../../components/TextField";
import { useToast } from "../../components/Toast";
import { ApiError } from "../../lib/api";
import { useCurrentStudy } from "../../lib/currentStudy";
import type { FieldErrors } from "../../lib/forms";
import { formLevelMessage } from "../../lib/forms";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useTraits } from "../../lib/queries/codebook";
import { useRun, useStartRun } from "../../lib/queries/runs";
import { useStudyTaxaTotal } from "../../lib/queries/taxaTotal";
import { useTimescale } from "../../lib/queries/timescale";
import { useRunPreview } from "./api";
import { BoundariesCard } from "./BoundariesCard";
import { checkDraft, draftFromParams, EMPTY_DRAFT, suggestedName, withTraitToggled, type Draft } from "./configDraft";
import { DesignSummary } from "./DesignSummary";
import { OptionsCard } from "./OptionsCard";
import { RunPanel, runToastKey } from "./RunPanel";
import { TraitsCard } from "./TraitsCard";
import { useDebounced } from "./useDebounced";

// The run last shown on this screen, per study, for this browser tab: coming back reopens it.
const lastRunKey = (studyId: string) => `stratasieve.selectivity.run.${studyId}`;
function readLastRun(studyId: string): string | null {
  try {
    return window.sessionStorage.getItem(lastRunKey(studyId));
  } catch {
    return null;
  }
}
function writeLastRun(studyId: string, runId: string | null): void {
  try {
    if (runId) window.sessionStorage.setItem(lastRunKey(studyId), runId);
    else window.sessionStorage.removeItem(lastRunKey(studyId));
  } catch {
    // Storage may be switched off; the screen then simply opens empty.
  }
}

/** The Selectivity screen: set up a run (boundaries, traits, options), read the design, run it, read the results. */
export function SelectivityPage() {
  const study = useCurrentStudy();
  useDocumentTitle(`Selectivity · ${study.name}`);
  const [search, setSearch] = useSearchParams();
  const runId = search.get("run");
  const traits = useTraits(study.id);
  const timescale = useTimescale();
  const scale = useMemo(() => (timescale.data ? indexScale(timescale.data.units) : null), [timescale.data]);
  const run = useRun(study.id, runId);
  const taxaTotal = useStudyTaxaTotal(study.id);

  useEffect(() => {
    if (runId) {
      writeLastRun(study.id, runId);
      return;
    }
    const last = readLastRun(study.id);
    if (last) setSearch({ run: last }, { replace: true });
  }, [runId, study.id, setSearch]);

  const openRun = (id: string | null) => {
    writeLastRun(study.id, id);
    setSearch(id ? { run: id } : {});
  };

  let body: ReactNode;
  if (traits.isPending || timescale.isPending) body = <LoadingState label="Loading the codebook and the time scale" lines={5} />;
  else if (traits.isError) body = <ErrorState error={traits.error} title="The codebook could not be loaded" onRetry={() => void traits.refetch()} />;
  else if (timescale.isError) body = <ErrorState error={timescale.error} title="The time scale could not be loaded" onRetry={() => void timescale.refetch()} />;
  else if (runId && run.isPending) body = <LoadingState label="Opening the run" lines={5} />;
  else if (!runId && taxaTotal.isPending) body = <LoadingState label="Loading the study’s taxa" lines={5} />;
  else if (!runId && taxaTotal.data === 0) body = <NothingToTestYet study={study} traitsInUse={traits.data.traits.filter((t) => !t.retired).length} />;
  else
    body = (
      <Workspace
        key={runId ?? "new"}
        study={study}
        codebook={traits.data.traits}
        timescale={timescale.data}
        scale={scale!}
        runId={runId}
        openedRun={run.data ?? null}
        onOpenRun={openRun}
      />
    );

  return (
    <>
      <PageHeader
        eyebrow={study.name}
        title="Selectivity"
        description="Did extinction across a boundary fall harder on some trait states than on others, and does the signal hold once clade and the other traits are allowed for?"
        actions={
          <>
            {runId && (
              <Button variant="ghost" onClick={() => openRun(null)}>
                New set-up
              </Button>
            )}
            <ButtonLink to={`${paths.study(study.id)}/runs`} variant="secondary">
              All runs
            </ButtonLink>
          </>
        }
      />
      {body}
    </>
  );
}

/** An empty study: no set-up to show yet, only what to do first (as the trait table says). */
function NothingToTestYet({ study, traitsInUse }: { study: Study; traitsInUse: number }) {
  const imports = can(study.role, "imports.run");
  const editsCodebook = can(study.role, "codebook.edit");
  return (
    <EmptyState
      title="This study has no taxa yet"
      description={
        <>
          A selectivity test needs taxa with first and last appearances and coded traits.{" "}
          {traitsInUse === 0
            ? editsCodebook
              ? "First define the codebook (the traits to test), then import a CSV of taxa with their ranges and trait values."
              : "The codebook has no traits yet either: a coder or the study lead defines it, then imports the taxa."
            : imports
              ? "First import a CSV of taxa with their ranges and trait values, or add taxa in the trait table; the set-up of a run appears here once there are taxa."
              : "A coder or the study lead imports them; the set-up of a run appears here once there are taxa."}
        </>
      }
      action={
        <>
          {traitsInUse === 0 && editsCodebook && <ButtonLink to={`${paths.study(study.id)}/codebook`}>Define the codebook</ButtonLink>}
          {imports && (
            <ButtonLink to={`${paths.study(study.id)}/imports`} variant={traitsInUse === 0 && editsCodebook ? "secondary" : "primary"}>
              Import taxa
            </ButtonLink>
          )}
          <ButtonLink to={`${paths.study(study.id)}/table`} variant="secondary">
            Open the trait table
          </ButtonLink>
        </>
      }
    />
  );
}

type View = "setup" | "results";

interface WorkspaceProps {
  study: Study;
  codebook: Trait[];
  timescale: Timescale;
  scale: ScaleIndex;
  runId: string | null;
  openedRun: Run | null;
  onOpenRun: (runId: string | null) => void;
}

function Workspace({ study, codebook, timescale, scale, runId, openedRun, onOpenRun }: WorkspaceProps) {
  const inForce = useMemo(() => codebook.filter((t) => !t.retired), [codebook]);
  const [initial] = useState(() => (openedRun ? draftFromParams(openedRun.params, codebook) : { draft: EMPTY_DRAFT, missingTraits: 0 }));
  const [draft, setDraftState] = useState<Draft>(initial.draft);
  const [view, setView] = useState<View>(runId ? "results" : "setup");
  const [attempted, setAttempted] = useState(false);
  const [serverErrors, setServerErrors] = useState<FieldErrors>({});
  const toast = useToast();
  const start = useStartRun(study.id);
  const canRun = can(study.role, "runs.create");

  const check = checkDraft(scale, draft);
  const validParams = check.ok ? check.params : null;
  const debounced = useDebounced(validParams, 350);
  // A preview is asked for only for parameters the schema accepts (the debounced copy lags by a moment).
  const asked = validParams !== null && debounced !== null;
  const preview = useRunPreview(study.id, asked ? debounced : null);
  const previewFields = preview.error instanceof ApiError ? preview.error.fields : {};
  const schemaErrors = check.ok ? {} : check.errors;
  const errors: FieldErrors = { ...(attempted ? schemaErrors : {}), ...previewFields, ...serverErrors };
  const problems = Object.values(schemaErrors);

  const setDraft = (next: Draft) => {
    setDraftState(next);
    setServerErrors({});
  };

  const submit = (event: FormEvent<HTMLFormElement>) => {
    event.preventDefault();
    setAttempted(true);
    if (!check.ok) return;
    start.mutate(check.params as RunParams, {
      onSuccess: (created) => {
        toast.show(`“${created.name}” is queued. Its progress shows below.`, "success", { key: runToastKey(created.id) });
        onOpenRun(created.id);
      },
      onError: (error) => {
        if (error instanceof ApiError) setServerErrors(error.fields);
      },
    });
  };

  const runMessage = attempted && !check.ok ? `Check the set-up first: ${problems.slice(0, 3).join(" ")}` : formLevelMessage(start.error);

  return (
    <div className="space-y-6">
      <ViewTabs view={view} onView={setView} runOpen={runId !== null} runName={openedRun?.name ?? null} />

      {view === "setup" && (
        <div className="space-y-6" role="tabpanel" aria-label="Set up">
          {openedRun && (
            <Notice title={`Set up as in “${openedRun.name}”`}>
              Change anything and run again to make a new run; the stored run stays as it was.
              {initial.missingTraits > 0 && ` ${initial.missingTraits === 1 ? "One of its traits is" : `${initial.missingTraits} of its traits are`} no longer in the codebook and left out.`}
            </Notice>
          )}
          <BoundariesCard
            timescale={timescale}
            scale={scale}
            boundaries={draft.boundaries}
            errors={errors}
            onChange={(boundaries) => setDraft({ ...draft, boundaries })}
            crisisKey={draft.crisisKey}
            onCrisisChange={(crisisKey) => setDraft({ ...draft, crisisKey })}
            robustness={{ windowFactors: draft.windowFactors, truncationMyr: draft.truncationMyr }}
            onRobustnessChange={(next) => setDraft({ ...draft, ...next })}
          />
          <TraitsCard
            studyId={study.id}
            traits={inForce}
            chosen={draft.traits}
            errors={errors}
            onToggle={(traitId, on) => setDraft(withTraitToggled(draft, codebook, traitId, on))}
            onChange={(trait) => setDraft({ ...draft, traits: draft.traits.map((t) => (t.traitId === trait.traitId ? trait : t)) })}
            onChooseAll={(on) => setDraft({ ...draft, traits: on ? inForce.map((t) => draft.traits.find((d) => d.traitId === t.id) ?? { traitId: t.id }) : [] })}
          />
          <OptionsCard draft={draft} errors={errors} onChange={(next) => setDraft({ ...draft, ...next })} />
          <DesignSummary problems={problems} preview={preview} asked={asked} />

          <Card title="5. Run">
            <form noValidate onSubmit={submit} aria-label="Run the selectivity tests">
              <div className="flex flex-wrap items-start gap-4">
                <TextField
                  label="Name of the run"
                  name="name"
                  value={draft.name ?? suggestedName(scale, draft)}
                  error={errors.name}
                  hint="Shown in the list of runs, the exports and the report."
                  className="w-full sm:w-[28rem]"
                  onChange={(event) => setDraft({ ...draft, name: event.target.value })}
                />
                <Button type="submit" className="sm:mt-7" busy={start.isPending} disabled={!canRun}>
                  Run the tests
                </Button>
              </div>
              {!canRun && (
                <p className="mt-3 text-sm text-stone-600">
                  As {ROLE_LABELS[study.role].toLowerCase()} you can preview designs and read every run; analysts and the study lead start runs.
                </p>
              )}
              <FormError message={runMessage} className="mt-4" />
              <p className="mt-3 text-sm text-stone-500">
                The run is computed on the server and stored with a fingerprint of the exact data it read. You can leave this screen while it runs.
              </p>
            </form>
          </Card>
        </div>
      )}

      {view === "results" && runId && (
        <div role="tabpanel" aria-label="Run and results">
          <RunPanel study={study} runId={runId} onRerun={(created) => onOpenRun(created.id)} />
        </div>
      )}
      {view === "results" && !runId && (
        <Card>
          <p className="text-[15px] text-stone-600">No run is open. Set one up and run it, or open a stored run from the list of runs.</p>
        </Card>
      )}
    </div>
  );
}

function ViewTabs({ view, onView, runOpen, runName }: { view: View; onView: (view: View) => void; runOpen: boolean; runName: string | null }) {
  const id = useId();
  const tab = (value: View, label: ReactNode, disabled = false) => (
    <button
      type="button"
      role="tab"
      id={`${id}-${value}`}
      aria-selected={view === value}
      disabled={disabled}
      onClick={() => onView(value)}
      className={cx(
        "-mb-px border-b-2 px-4 py-2.5 text-[15px] font-medium transition-colors disabled:cursor-not-allowed disabled:text-stone-400",
        view === value ? "border-accent-600 text-accent-900" : "border-transparent text-stone-600 hover:text-stone-900",
        focusRing,
      )}
    >
      {label}
    </button>
  );
  return (
    <div role="tablist" aria-label="Selectivity screen" className="flex gap-2 border-b border-stone-200">
      {tab("setup", "Set up")}
      {tab("results", runOpen ? <>Results{runName ? <span className="ml-1.5 font-normal text-stone-500">· {runName.length > 40 ? `${runName.slice(0, 39)}…` : runName}</span> : null}</> : "Results", !runOpen)}
    </div>
  );
}
