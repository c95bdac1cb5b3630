import { useId, type KeyboardEvent } from "react";
import type { BoundaryOutcomeName, OutcomesResult, OutcomeTaxon } from "@shared/schemas/outcomes";
import { Button } from "../../components/Button";
import { Card } from "../../components/Card";
import { ErrorState } from "../../components/ErrorState";
import { focusRing } from "../../components/focus";
import { cx } from "../../lib/cx";
import { LoadingState } from "../../components/LoadingState";
import { formatCount } from "../../lib/format";
import { useOutcomes, type OutcomesRequest } from "./api";
import { OutcomeBadge } from "./OutcomeBadge";
import { agesWriter, formatMa } from "../../components/timescale/ages";
import { GROUP_ORDER, OUTCOME_GROUP_LABEL, OUTCOME_LABEL } from "./words";
import { LIST_PAGE_SIZE } from "./screenQueries";


const FLAG_LABEL: Record<OutcomeTaxon["flags"][number], string> = {
  singleInterval: "single stage",
  lastSeenBelowBoundary: "last seen below the boundary",
  missingRange: "range missing",
  invalidRange: "range unusable",
};

export interface OutcomeListsProps {
  studyId: string;
  result: OutcomesResult;
  /** The boundary and window of `result`, to fetch further pages of one group. */
  request: OutcomesRequest;
  list: BoundaryOutcomeName;
  page: number;
  onList: (list: BoundaryOutcomeName, page: number) => void;
  canOverride: boolean;
  onSetOutcome: (taxon: OutcomeTaxon) => void;
  onRevoke: (taxon: OutcomeTaxon) => void;
}

/** Survivors, victims and taxa not at risk, one group at a time, with the action to set an outcome by hand. */
export function OutcomeLists({ studyId, result, request, list, page, onList, canOverride, onSetOutcome, onRevoke }: OutcomeListsProps) {
  const tabsId = useId();
  // The first page of each group came with the counts; later pages are fetched for one group.
  const laterPage = useOutcomes(studyId, page > 1 ? { ...request, group: list, page, pageSize: LIST_PAGE_SIZE } : null);
  const current = page > 1 ? laterPage.data?.lists[list] : result.lists[list];

  const moveFocus = (event: KeyboardEvent<HTMLButtonElement>, index: number) => {
    const step = event.key === "ArrowRight" ? 1 : event.key === "ArrowLeft" ? -1 : 0;
    if (!step) return;
    event.preventDefault();
    const next = GROUP_ORDER[(index + step + GROUP_ORDER.length) % GROUP_ORDER.length];
    onList(next, 1);
    document.getElementById(`${tabsId}-tab-${next}`)?.focus();
  };

  return (
    <Card title="Taxa in each group" description="Sorted by name. Ages as coded in the trait table.">
      <div role="tablist" aria-label="Outcome groups" className="-mt-1 flex flex-wrap gap-1 border-b border-stone-200">
        {GROUP_ORDER.map((group, index) => {
          const selected = group === list;
          return (
            <button
              key={group}
              id={`${tabsId}-tab-${group}`}
              type="button"
              role="tab"
              aria-selected={selected}
              aria-controls={`${tabsId}-panel`}
              tabIndex={selected ? 0 : -1}
              onClick={() => onList(group, 1)}
              onKeyDown={(event) => moveFocus(event, index)}
              className={cx(
                "-mb-px rounded-t-md border-b-2 px-3 py-2 text-[15px] font-medium transition-colors",
                selected ? "border-accent-600 text-accent-900" : "border-transparent text-stone-600 hover:border-stone-300 hover:text-stone-900",
                focusRing,
              )}
            >
              {OUTCOME_GROUP_LABEL[group]} <span className="tabular-nums text-stone-500">({formatCount(result.counts[group])})</span>
            </button>
          );
        })}
      </div>

      <div id={`${tabsId}-panel`} role="tabpanel" aria-labelledby={`${tabsId}-tab-${list}`} className="pt-4">
        {page > 1 && !current && !laterPage.isError && <LoadingState label={`Loading page ${page}`} lines={4} />}
        {page > 1 && laterPage.isError && <ErrorState error={laterPage.error} title="This page could not be loaded" onRetry={() => void laterPage.refetch()} />}
        {current && current.total === 0 && (
          <p className="rounded-lg border border-dashed border-stone-300 px-4 py-6 text-center text-[15px] text-stone-500">
            {list === "survivor" && "No taxon’s range crosses this boundary."}
            {list === "victim" && "No taxon was last seen in the window below this boundary."}
            {list === "excluded" && "Every taxon is at risk at this boundary."}
          </p>
        )}
        {current && current.total > 0 && current.items.length === 0 && (
          <p className="rounded-lg border border-dashed border-stone-300 px-4 py-6 text-center text-[15px] text-stone-600">
            This page is past the end of the list.{" "}
            <Button variant="secondary" size="sm" className="ml-2" onClick={() => onList(list, 1)}>
              Back to the first page
            </Button>
          </p>
        )}
        {current && current.items.length > 0 && (
          <>
            <TaxonTable items={current.items} canOverride={canOverride} onSetOutcome={onSetOutcome} onRevoke={onRevoke} />
            <Pager total={current.total} page={page} pageSize={LIST_PAGE_SIZE} onPage={(p) => onList(list, p)} />
          </>
        )}
      </div>
    </Card>
  );
}

function TaxonTable({
  items,
  canOverride,
  onSetOutcome,
  onRevoke,
}: {
  items: OutcomeTaxon[];
  canOverride: boolean;
  onSetOutcome: (taxon: OutcomeTaxon) => void;
  onRevoke: (taxon: OutcomeTaxon) => void;
}) {
  // The age columns write every age of the page alike: "94.00" beside "94.41", not "94".
  const ages = agesWriter(items.flatMap((t) => [t.fad, t.lad]));
  return (
    <div className="-mx-5 overflow-x-auto sm:-mx-6">
      <table className="w-full min-w-[40rem] text-left text-[15px]">
        <thead className="border-b border-stone-200 text-sm text-stone-500">
          <tr>
            <th scope="col" className="py-2 pr-3 pl-5 font-medium sm:pl-6">
              Taxon
            </th>
            <th scope="col" className="px-3 py-2 text-right font-medium">
              First (Ma)
            </th>
            <th scope="col" className="px-3 py-2 text-right font-medium">
              Last (Ma)
            </th>
            <th scope="col" className="px-3 py-2 font-medium">
              Outcome
            </th>
            {canOverride && (
              <th scope="col" className="py-2 pr-5 pl-3 font-medium sm:pr-6">
                <span className="sr-only">Actions</span>
              </th>
            )}
          </tr>
        </thead>
        <tbody className="divide-y divide-stone-100">
          {items.map((taxon) => (
            <tr key={taxon.taxonId} data-taxon={taxon.name} className="align-top">
              <td className="py-2.5 pr-3 pl-5 sm:pl-6">
                <p className="font-medium text-stone-900 italic">{taxon.name}</p>
                {taxon.higherTaxon && <p className="text-sm text-stone-500">{taxon.higherTaxon}</p>}
                {(taxon.flags.length > 0 || taxon.rangeProblem) && (
                  <p className="mt-1 flex flex-wrap gap-1.5">
                    {taxon.flags.map((flag) => (
                      <span key={flag} className="rounded bg-caution-50 px-1.5 py-0.5 text-xs font-medium text-caution-700 ring-1 ring-caution-200">
                        {FLAG_LABEL[flag]}
                      </span>
                    ))}
                  </p>
                )}
                {taxon.rangeProblem && <p className="mt-1 text-sm text-caution-700">{taxon.rangeProblem}</p>}
              </td>
              <td className="px-3 py-2.5 text-right tabular-nums">{taxon.fad === null ? <span className="text-stone-500">—</span> : ages.number(taxon.fad)}</td>
              <td className="px-3 py-2.5 text-right tabular-nums">{taxon.lad === null ? <span className="text-stone-500">—</span> : ages.number(taxon.lad)}</td>
              <td className="px-3 py-2.5">
                <OutcomeBadge outcome={taxon.outcome} />
                {taxon.override && (
                  <div className="mt-1 max-w-xs text-sm text-stone-600">
                    <p>
                      <span className="font-medium text-stone-800">Set by hand</span>{" "}
                      {taxon.override.boundaryMa === null ? "for every boundary" : `for ${formatMa(taxon.override.boundaryMa)}`}; from the range:{" "}
                      {OUTCOME_LABEL[taxon.computedOutcome].toLowerCase()}.
                    </p>
                    <p className="mt-0.5 break-words text-stone-500 italic">“{taxon.override.reason}”</p>
                  </div>
                )}
              </td>
              {canOverride && (
                <td className="py-2.5 pr-5 pl-3 sm:pr-6">
                  <div className="flex flex-col items-end gap-1">
                    <Button variant="secondary" size="sm" onClick={() => onSetOutcome(taxon)} aria-label={`Set outcome of ${taxon.name}`}>
                      Set outcome…
                    </Button>
                    {taxon.override && (
                      <Button
                        variant="ghost"
                        size="sm"
                        onClick={() => onRevoke(taxon)}
                        aria-label={`Revoke the outcome set by hand for ${taxon.name}`}
                      >
                        Revoke…
                      </Button>
                    )}
                  </div>
                </td>
              )}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function Pager({ total, page, pageSize, onPage }: { total: number; page: number; pageSize: number; onPage: (page: number) => void }) {
  const pages = Math.max(1, Math.ceil(total / pageSize));
  if (pages === 1) return null;
  const first = (page - 1) * pageSize + 1;
  const last = Math.min(total, page * pageSize);
  return (
    <nav aria-label="Pages of this group" className="mt-4 flex items-center justify-between gap-3 text-sm text-stone-600">
      <p className="tabular-nums">
        {formatCount(first)}–{formatCount(last)} of {formatCount(total)}
      </p>
      <div className="flex gap-2">
        <Button variant="secondary" size="sm" disabled={page <= 1} onClick={() => onPage(page - 1)}>
          Previous
        </Button>
        <Button variant="secondary" size="sm" disabled={page >= pages} onClick={() => onPage(page + 1)}>
          Next
        </Button>
      </div>
    </nav>
  );
}
