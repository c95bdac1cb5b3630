import { useState } from "react";
import type { OutcomeOverride } from "@shared/schemas/outcomes";
import { Button } from "../../components/Button";
import { Card } from "../../components/Card";
import { ErrorState } from "../../components/ErrorState";
import { cx } from "../../lib/cx";
import { LoadingState } from "../../components/LoadingState";
import { Select } from "../../components/Select";
import { ThreadDrawer } from "../../components/threads/ThreadDrawer";
import { formatCount, formatDateTime } from "../../lib/format";
import { useOverrides, type OverrideStatus } from "./api";
import { OutcomeBadge } from "./OutcomeBadge";
import type { RevokeTarget } from "./OverrideDialogs";
import { formatMa } from "../../components/timescale/ages";

const PAGE_SIZE = 20;

const STATUS_OPTIONS: ReadonlyArray<{ value: OverrideStatus; label: string }> = [
  { value: "active", label: "In force" },
  { value: "revoked", label: "Revoked" },
  { value: "all", label: "All" },
];

/** Every outcome set by hand in the study, for any boundary: who set it, when and why, and its revocation. */
export function OverridesCard({ studyId, canOverride, onRevoke }: { studyId: string; canOverride: boolean; onRevoke: (target: RevokeTarget) => void }) {
  const [status, setStatus] = useState<OverrideStatus>("active");
  const [page, setPage] = useState(1);
  const [discussing, setDiscussing] = useState<OutcomeOverride | null>(null);
  const overrides = useOverrides(studyId, status, page, PAGE_SIZE);
  const data = overrides.data;
  const pages = data ? Math.max(1, Math.ceil(data.total / PAGE_SIZE)) : 1;

  return (
    <Card
      title="Outcomes set by hand"
      description="Coding decisions for this study at any boundary. Each keeps who set it, when and why; revoking one keeps it on record."
      actions={
        <Select
          label="Show"
          hideLabel
          value={status}
          onChange={(event) => {
            setStatus(event.target.value as OverrideStatus);
            setPage(1);
          }}
          options={STATUS_OPTIONS}
          className="w-36"
        />
      }
    >
      {overrides.isPending && <LoadingState label="Loading the outcomes set by hand" lines={2} />}
      {overrides.isError && <ErrorState error={overrides.error} title="The outcomes set by hand could not be loaded" onRetry={() => void overrides.refetch()} />}
      {data && data.total === 0 && (
        <p className="text-[15px] text-stone-500">
          {status === "revoked"
            ? "No outcome set by hand has been revoked."
            : status === "active"
              ? `None in force.${canOverride ? " Use “Set outcome…” beside a taxon in the lists to set one, with a reason." : ""}`
              : "No outcome has been set by hand in this study."}
        </p>
      )}
      {data && data.total > 0 && (
        <>
          <ul className={cx("-my-3 divide-y divide-stone-100", overrides.isPlaceholderData && "opacity-60")}>
            {data.overrides.map((o) => (
              <OverrideItem key={o.id} override={o} canOverride={canOverride} onRevoke={onRevoke} onDiscuss={setDiscussing} />
            ))}
          </ul>
          {pages > 1 && (
            <div className="mt-5 flex items-center justify-between text-sm text-stone-600">
              <p className="tabular-nums">
                Page {formatCount(page)} of {formatCount(pages)}
              </p>
              <div className="flex gap-2">
                <Button variant="secondary" size="sm" disabled={page <= 1} onClick={() => setPage(page - 1)}>
                  Previous
                </Button>
                <Button variant="secondary" size="sm" disabled={page >= pages} onClick={() => setPage(page + 1)}>
                  Next
                </Button>
              </div>
            </div>
          )}
        </>
      )}
      {discussing && (
        <ThreadDrawer
          studyId={studyId}
          target={{ type: "override", id: discussing.id }}
          targetLabel={`Outcome of ${discussing.taxonName} set by hand`}
          onClose={() => setDiscussing(null)}
        />
      )}
    </Card>
  );
}

interface OverrideItemProps {
  override: OutcomeOverride;
  canOverride: boolean;
  onRevoke: (target: RevokeTarget) => void;
  onDiscuss: (override: OutcomeOverride) => void;
}

function OverrideItem({ override: o, canOverride, onRevoke, onDiscuss }: OverrideItemProps) {
  return (
    <li className="flex flex-col gap-2 py-3 sm:flex-row sm:items-start sm:justify-between" data-override-taxon={o.taxonName}>
      <div className="min-w-0">
        <p className="flex flex-wrap items-center gap-2">
          <span className="font-medium text-stone-900 italic">{o.taxonName}</span>
          <OutcomeBadge outcome={o.outcome} />
          <span className="text-sm text-stone-500">{o.boundaryMa === null ? "every boundary" : `at ${formatMa(o.boundaryMa)}`}</span>
          {o.source === "import" && <span className="text-sm text-stone-500">· from an import</span>}
          {!o.active && <span className="rounded bg-stone-100 px-1.5 py-0.5 text-xs font-semibold text-stone-600">Revoked</span>}
        </p>
        <p className="mt-1 text-sm break-words text-stone-700">“{o.reason}”</p>
        <p className="mt-0.5 text-sm text-stone-500">
          Set by {o.createdBy?.name ?? "a former member"} on {formatDateTime(o.createdAt)}
        </p>
        {!o.active && o.revokedAt && (
          <p className="mt-0.5 text-sm text-stone-500">
            Revoked by {o.revokedBy?.name ?? "a former member"} on {formatDateTime(o.revokedAt)}
            {o.revokeReason ? `: “${o.revokeReason}”` : ""}
          </p>
        )}
      </div>
      <div className="flex shrink-0 gap-1 self-start">
        <Button variant="ghost" size="sm" aria-label={`Discuss the outcome set by hand for ${o.taxonName}`} onClick={() => onDiscuss(o)}>
          Discuss
        </Button>
        {canOverride && o.active && (
          <Button
            variant="ghost"
            size="sm"
            aria-label={`Revoke the outcome set by hand for ${o.taxonName}`}
            onClick={() => onRevoke({ overrideId: o.id, taxonName: o.taxonName, outcome: o.outcome, boundaryMa: o.boundaryMa })}
          >
            Revoke…
          </Button>
        )}
      </div>
    </li>
  );
}
