import { useEffect, useMemo, useState, type ReactNode } from "react";
import { useSearchParams } from "react-router-dom";
import { can } from "@shared/roles";
import type { OutcomesResult, OutcomeTaxon } from "@shared/schemas/outcomes";
import { ButtonLink } from "../../components/Button";
import { Caution } from "../../components/Caution";
import { EmptyState } from "../../components/EmptyState";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { Notice } from "../../components/Notice";
import { PageHeader } from "../../components/PageHeader";
import { useCurrentStudy } from "../../lib/currentStudy";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useTimescale } from "../../lib/queries/timescale";
import { turnoverCsvUrl, useOutcomes, useTurnover, type OutcomesRequest } from "./api";
import { BoundaryScorecard } from "./BoundaryScorecard";
import { TurnoverSection } from "./TurnoverSection";
import { BoundaryPicker } from "./BoundaryPicker";
import { readBoundaryView, withChoice, withList, withWindow, type BoundaryView } from "./boundaryParams";
import { knownBoundaryAge, openingSearch, outcomesRequestOf, turnoverRequestOf } from "./screenQueries";
import { ClassificationRules } from "./ClassificationRules";
import { SamplingCompleteness } from "./SamplingCompleteness";
import { ThreeTimerChart } from "./ThreeTimerChart";
import { OutcomeLists } from "./OutcomeLists";
import { OutcomeSummary } from "./OutcomeSummary";
import { OutcomeWarnings } from "./OutcomeWarnings";
import { OverridesCard } from "./OverridesCard";
import { RevokeOverrideDialog, SetOutcomeDialog, type RevokeTarget } from "./OverrideDialogs";
import { RatesChart } from "./RatesChart";
import { indexScale } from "../../components/timescale/scaleIndex";

/** The report's link: the boundary, window and list of the screen, and the diversity split. */
function reportSearch(search: URLSearchParams, splitBy: string): string {
  const next = new URLSearchParams(search);
  if (splitBy) next.set("split", splitBy);
  else next.delete("split");
  return next.toString();
}

/** The Boundary screen: choose a boundary and window, see who survived, who was lost and why to be careful. */
export function BoundaryPage() {
  const study = useCurrentStudy();
  useDocumentTitle(`Boundary · ${study.name}`);
  const [search, setSearch] = useSearchParams();
  const opening = openingSearch(study, search);
  const openingKey = opening?.toString();
  useEffect(() => {
    if (openingKey !== undefined) setSearch(new URLSearchParams(openingKey), { replace: true });
  }, [openingKey, setSearch]);
  const view = readBoundaryView(opening ?? search);
  const request = outcomesRequestOf(view);
  const timescale = useTimescale();
  const scale = useMemo(() => (timescale.data ? indexScale(timescale.data.units) : null), [timescale.data]);
  const outcomes = useOutcomes(study.id, request);
  const canOverride = can(study.role, "outcomes.override");
  const [setting, setSetting] = useState<OutcomeTaxon | null>(null);
  const [revoking, setRevoking] = useState<RevokeTarget | null>(null);
  const [splitBy, setSplitBy] = useState("");
  const turnoverRequest = turnoverRequestOf(request, splitBy);
  const turnover = useTurnover(study.id, turnoverRequest);

  const chosenUnit = view.choice?.kind === "unit" && scale ? scale.resolve(view.choice.name) : undefined;
  // The main boundary carries its age, so the screen opens there without waiting for the time scale.
  const boundary = chosenUnit?.base ?? knownBoundaryAge(study, view);
  const result = outcomes.data && !outcomes.isPlaceholderData ? outcomes.data : undefined;
  const chart = <RatesChart studyId={study.id} boundary={boundary} />;
  const windowInEffect = result?.window ?? view.window ?? (boundary !== null && scale ? (scale.defaultWindow(boundary)?.windowMyr ?? null) : null);

  return (
    <>
      <PageHeader
        eyebrow={study.name}
        title="Boundary"
        description="Choose a boundary of the time scale and the window below it, and see which taxa survived it, which were lost, and which were not at risk."
        actions={
          request ? (
            <ButtonLink to={`${paths.study(study.id)}/boundary/report?${reportSearch(search, splitBy)}`} variant="secondary">
              Printable report
            </ButtonLink>
          ) : undefined
        }
      />
      <div className="space-y-6">
        {timescale.isPending && <LoadingState label="Loading the time scale" lines={3} />}
        {timescale.isError && <ErrorState error={timescale.error} title="The time scale could not be loaded" onRetry={() => void timescale.refetch()} />}
        {timescale.data && scale && (
          <BoundaryPicker
            timescale={timescale.data}
            scale={scale}
            choice={view.choice}
            chosenUnit={chosenUnit}
            boundary={boundary}
            windowParam={view.window}
            windowInEffect={windowInEffect}
            onChoose={(choice) => setSearch(withChoice(search, choice))}
            onWindow={(window) => setSearch(withWindow(search, window))}
          />
        )}

        {study.mainBoundary && boundary !== null && Math.abs(study.mainBoundary.boundaryMa - boundary) < 1e-9 && (
          <p className="text-sm text-stone-600" data-testid="main-boundary-note">
            {study.mainBoundary.source === "run"
              ? `The study’s main boundary: the crisis boundary of its newest run, “${study.mainBoundary.runName ?? "a run"}”.`
              : "The study’s main boundary, as set on the study’s overview."}
          </p>
        )}

        {view.problems.length > 0 && (
          <Notice tone="error" title="This link’s boundary could not be used">
            <ul className="list-disc pl-5">
              {view.problems.map((problem) => (
                <li key={problem}>{problem}</li>
              ))}
            </ul>
            <p className="mt-1">Choose the boundary again above.</p>
          </Notice>
        )}

        {!view.choice && view.problems.length === 0 && (
          <EmptyState
            title="Choose a boundary"
            description="Pick a period, epoch or stage whose base is the boundary, or type an age in Ma. The counts, warnings and lists appear here, and the link in the address bar will reopen this view."
          />
        )}

        {request && outcomes.isPending && <LoadingState label="Sorting taxa across the boundary" lines={5} />}
        {request && outcomes.isError && (
          <ErrorState error={outcomes.error} title="The outcomes could not be worked out" onRetry={() => void outcomes.refetch()} />
        )}
        {request && outcomes.data && (
          <ResultsHead
            studyId={study.id}
            result={outcomes.data}
            refreshing={outcomes.isPlaceholderData || outcomes.isFetching}
            scorecard={<BoundaryScorecard turnover={turnover} csvUrl={turnoverRequest ? turnoverCsvUrl(study.id, "scorecard", turnoverRequest) : null} />}
          />
        )}

        {/* One place in the page whatever the outcomes show, so the chart and its data stay put when they arrive. */}
        {chart}

        {request && outcomes.data && outcomes.data.counts.total > 0 && (
          <ResultsTail
            studyId={study.id}
            result={outcomes.data}
            request={request}
            view={view}
            turnover={
              <TurnoverSection
                turnover={turnover}
                splitBy={splitBy}
                onSplitBy={setSplitBy}
                csvUrl={turnoverRequest ? turnoverCsvUrl(study.id, "turnover", turnoverRequest) : null}
              />
            }
            canOverride={canOverride}
            onList={(list, page) => setSearch(withList(search, list, page), { preventScrollReset: true })}
            onSetOutcome={setSetting}
            onRevoke={setRevoking}
          />
        )}

        {boundary !== null && <SamplingCompleteness studyId={study.id} boundaryMa={boundary} />}
        <ThreeTimerChart studyId={study.id} boundary={boundary} />

        <OverridesCard studyId={study.id} canOverride={canOverride} onRevoke={setRevoking} />
      </div>

      {setting && result && <SetOutcomeDialog key={setting.taxonId} studyId={study.id} taxon={setting} boundary={result.boundary} onClose={() => setSetting(null)} />}
      {revoking && <RevokeOverrideDialog key={revoking.overrideId} studyId={study.id} target={revoking} onClose={() => setRevoking(null)} />}
    </>
  );
}

/** The counts and the scorecard, with the cautions; or what to do when the study has no taxa yet. */
function ResultsHead({ studyId, result, refreshing, scorecard }: { studyId: string; result: OutcomesResult; refreshing: boolean; scorecard: ReactNode }) {
  if (result.counts.total === 0) {
    return (
      <EmptyState
        title="No taxa in this study yet"
        description="Outcomes need taxa with first and last appearances. Add them in the trait table, or import a table, then come back to this boundary."
        action={
          <ButtonLink to={`${paths.study(studyId)}/table`} variant="secondary">
            Open the trait table
          </ButtonLink>
        }
      />
    );
  }
  return (
    <>
      <OutcomeSummary result={result} refreshing={refreshing} />
      {scorecard}
      <div className="space-y-3">
        <Caution title="The counts rest on the ranges as coded">
          Who counts as a survivor or a victim depends on the first and last appearances as coded and on how well each stage was sampled. A last find
          comes before the true extinction, so ranges are truncated: some victims look earlier than they were, and an abrupt loss can look gradual. The
          warnings below say how many taxa this may touch.
        </Caution>
        <Caution title="Association, not mechanism">
          Selectivity results are statistical associations across a boundary, not proof of a kill mechanism; a shared cause can produce them.
        </Caution>
      </div>
    </>
  );
}

interface ResultsTailProps {
  studyId: string;
  result: OutcomesResult;
  request: OutcomesRequest;
  view: BoundaryView;
  /** Origination beside extinction, the crisis against background, and diversity through time. */
  turnover: ReactNode;
  canOverride: boolean;
  onList: (list: BoundaryView["list"], page: number) => void;
  onSetOutcome: (taxon: OutcomeTaxon) => void;
  onRevoke: (target: RevokeTarget) => void;
}

/** After the extinction chart: turnover, the warnings and rules, and the lists of taxa. */
function ResultsTail({ studyId, result, request, view, turnover, canOverride, onList, onSetOutcome, onRevoke }: ResultsTailProps) {
  return (
    <>
      {turnover}
      <div className="grid gap-6 xl:grid-cols-2">
        <OutcomeWarnings warnings={result.warnings} />
        <ClassificationRules boundary={result.boundary} window={result.window} />
      </div>
      <OutcomeLists
        studyId={studyId}
        result={result}
        request={request}
        list={view.list}
        page={view.page}
        onList={onList}
        canOverride={canOverride}
        onSetOutcome={onSetOutcome}
        onRevoke={(taxon) =>
          taxon.override &&
          onRevoke({ overrideId: taxon.override.id, taxonName: taxon.name, outcome: taxon.override.outcome, boundaryMa: taxon.override.boundaryMa })
        }
      />
    </>
  );
}
