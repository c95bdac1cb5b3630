import { useId, useState } from "react";
import {
  BOUNDARY_OUTCOMES,
  outcomeOverrideCreateSchema,
  outcomeOverrideRevokeSchema,
  type BoundaryOutcomeName,
  type OutcomeTaxon,
} from "@shared/schemas/outcomes";
import { ConfirmDialog } from "../../components/ConfirmDialog";
import { TextArea } from "../../components/TextField";
import { useToast } from "../../components/Toast";
import { ApiError } from "../../lib/api";
import { formLevelMessage, issuesToFieldErrors, type FieldErrors } from "../../lib/forms";
import { useCreateOverride, useRevokeOverride } from "./api";
import { formatMa } from "../../components/timescale/ages";
import { OUTCOME_LABEL } from "./words";

const OUTCOME_HELP: Record<BoundaryOutcomeName, string> = {
  survivor: "It lived on past the boundary.",
  victim: "It died out at the boundary.",
  excluded: "Leave it out: it cannot tell survival from loss here.",
};

function serverFieldErrors(error: unknown): FieldErrors {
  return error instanceof ApiError ? error.fields : {};
}

/** Set one taxon's outcome by hand, with a reason; recorded as a coding decision. */
export function SetOutcomeDialog({ studyId, taxon, boundary, onClose }: { studyId: string; taxon: OutcomeTaxon; boundary: number; onClose: () => void }) {
  const create = useCreateOverride(studyId);
  const toast = useToast();
  const groupName = useId();
  const [outcome, setOutcome] = useState<BoundaryOutcomeName>(taxon.outcome);
  const [scope, setScope] = useState<"this" | "every">(taxon.override?.boundaryMa === null ? "every" : "this");
  const [reason, setReason] = useState("");
  const [errors, setErrors] = useState<FieldErrors>({});

  const submit = () => {
    const parsed = outcomeOverrideCreateSchema.safeParse({ taxonId: taxon.taxonId, outcome, boundaryMa: scope === "this" ? boundary : null, reason });
    if (!parsed.success) {
      setErrors(issuesToFieldErrors(parsed.error));
      return;
    }
    setErrors({});
    create.mutate(parsed.data, {
      onSuccess: () => {
        toast.show(`${taxon.name} is now counted as ${OUTCOME_LABEL[outcome].toLowerCase()}${scope === "this" ? ` at ${formatMa(boundary)}` : " at every boundary"}.`);
        onClose();
      },
      onError: (error) => setErrors(serverFieldErrors(error)),
    });
  };

  return (
    <ConfirmDialog
      open
      tone="primary"
      title={`Set the outcome of ${taxon.name}`}
      confirmLabel="Set outcome"
      busy={create.isPending}
      error={formLevelMessage(create.error)}
      onCancel={onClose}
      onConfirm={submit}
    >
      <p>
        From its range it is <span className="font-semibold">{OUTCOME_LABEL[taxon.computedOutcome].toLowerCase()}</span>. An outcome set by hand is a coding
        decision: it is recorded with your name and reason, and can be revoked.
      </p>
      <fieldset>
        <legend className="text-sm font-medium text-stone-800">Outcome</legend>
        <div className="mt-1.5 space-y-1.5">
          {BOUNDARY_OUTCOMES.map((value) => (
            <label key={value} className="flex cursor-pointer items-start gap-2.5 rounded-md px-1 py-0.5 hover:bg-stone-50">
              <input
                type="radio"
                name={`${groupName}-outcome`}
                value={value}
                checked={outcome === value}
                onChange={() => setOutcome(value)}
                className="mt-1 size-4 accent-[#135a51]"
              />
              <span>
                <span className="font-medium text-stone-900">{OUTCOME_LABEL[value]}</span>
                <span className="block text-sm text-stone-600">{OUTCOME_HELP[value]}</span>
              </span>
            </label>
          ))}
        </div>
        {errors.outcome && <p className="mt-1 text-sm font-medium text-red-700">{errors.outcome}</p>}
      </fieldset>
      <fieldset>
        <legend className="text-sm font-medium text-stone-800">Holds for</legend>
        <div className="mt-1.5 space-y-1.5">
          <label className="flex cursor-pointer items-center gap-2.5 px-1">
            <input type="radio" name={`${groupName}-scope`} checked={scope === "this"} onChange={() => setScope("this")} className="size-4 accent-[#135a51]" />
            This boundary only ({formatMa(boundary)})
          </label>
          <label className="flex cursor-pointer items-center gap-2.5 px-1">
            <input type="radio" name={`${groupName}-scope`} checked={scope === "every"} onChange={() => setScope("every")} className="size-4 accent-[#135a51]" />
            Every boundary
          </label>
        </div>
        {errors.boundaryMa && <p className="mt-1 text-sm font-medium text-red-700">{errors.boundaryMa}</p>}
      </fieldset>
      <TextArea
        label="Reason"
        name="reason"
        rows={3}
        value={reason}
        error={errors.reason}
        onChange={(event) => {
          setReason(event.target.value);
          if (errors.reason) setErrors(({ reason: _dropped, ...rest }) => rest);
        }}
        hint="For example: known only from reworked material above the boundary; reappears after a gap."
      />
    </ConfirmDialog>
  );
}

export interface RevokeTarget {
  overrideId: string;
  taxonName: string;
  outcome: BoundaryOutcomeName;
  boundaryMa: number | null;
}

/** Revoke an outcome set by hand, with a reason: the outcome computed from the range applies again. */
export function RevokeOverrideDialog({ studyId, target, onClose }: { studyId: string; target: RevokeTarget; onClose: () => void }) {
  const revoke = useRevokeOverride(studyId);
  const toast = useToast();
  const [reason, setReason] = useState("");
  const [error, setError] = useState<string | undefined>();

  const submit = () => {
    const parsed = outcomeOverrideRevokeSchema.safeParse({ reason });
    if (!parsed.success) {
      setError(issuesToFieldErrors(parsed.error).reason);
      return;
    }
    setError(undefined);
    revoke.mutate(
      { overrideId: target.overrideId, reason: parsed.data.reason },
      {
        onSuccess: () => {
          toast.show(`The outcome set by hand for ${target.taxonName} was revoked.`, "info");
          onClose();
        },
        onError: (err) => setError(serverFieldErrors(err).reason),
      },
    );
  };

  return (
    <ConfirmDialog
      open
      tone="danger"
      title={`Revoke the outcome set for ${target.taxonName}?`}
      confirmLabel="Revoke"
      busy={revoke.isPending}
      error={formLevelMessage(revoke.error)}
      onCancel={onClose}
      onConfirm={submit}
    >
      <p>
        It was set to <span className="font-semibold">{OUTCOME_LABEL[target.outcome].toLowerCase()}</span>{" "}
        {target.boundaryMa === null ? "for every boundary" : `for the boundary at ${formatMa(target.boundaryMa)}`}. Once revoked, the outcome computed from the
        range applies again. The override stays in the record as revoked.
      </p>
      <TextArea
        label="Reason"
        name="reason"
        rows={3}
        value={reason}
        error={error}
        onChange={(event) => {
          setReason(event.target.value);
          setError(undefined);
        }}
        hint="For example: the range was corrected in the trait table."
      />
    </ConfirmDialog>
  );
}
