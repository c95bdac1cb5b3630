import { useMemo, useState } from "react";
import { can, ROLE_LABELS } from "@shared/roles";
import type { Trait } from "@shared/schemas/traits";
import { Button, buttonClasses } from "../../components/Button";
import { Card } from "../../components/Card";
import { ConfirmDialog } from "../../components/ConfirmDialog";
import { EmptyState } from "../../components/EmptyState";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { Notice } from "../../components/Notice";
import { PageHeader } from "../../components/PageHeader";
import { useToast } from "../../components/Toast";
import { useThreads } from "../../components/threads/api";
import { ThreadDrawer } from "../../components/threads/ThreadDrawer";
import { errorMessage } from "../../lib/api";
import { useCurrentStudy } from "../../lib/currentStudy";
import { formatDate, pluralize } from "../../lib/format";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useTraits } from "../../lib/queries/codebook";
import { codebookCsvUrl } from "../../lib/queries/paths";
import { useReorderTraits, useUpdateTrait } from "./api";
import { TraitEditor } from "./TraitEditor";
import { TraitSummary } from "./TraitSummary";
import { TimeBinsSummary } from "./TimeBinsSummary";

type Editing = { mode: "new" } | { mode: "edit"; traitId: string } | null;

export function CodebookPage() {
  const study = useCurrentStudy();
  useDocumentTitle(`Codebook · ${study.name}`);
  const traits = useTraits(study.id);
  const canEdit = can(study.role, "codebook.edit");
  const [editing, setEditing] = useState<Editing>(null);
  const [retiring, setRetiring] = useState<Trait | null>(null);
  const [discussing, setDiscussing] = useState<Trait | null>(null);
  const openThreads = useThreads(study.id, { targetType: "trait", status: "open", pageSize: 100 });
  const traitsWithOpenThreads = useMemo(() => new Set((openThreads.data?.rows ?? []).map((t) => t.target.id)), [openThreads.data]);
  const reorder = useReorderTraits(study.id);
  const update = useUpdateTrait(study.id);
  const toast = useToast();

  const all = traits.data?.traits ?? [];
  const active = all.filter((t) => !t.retired);
  const retired = all.filter((t) => t.retired);

  function move(index: number, by: -1 | 1) {
    const order = [...active];
    const [trait] = order.splice(index, 1);
    order.splice(index + by, 0, trait);
    reorder.mutate(
      { traitIds: [...order, ...retired].map((t) => t.id) },
      { onError: (error) => toast.show(`The order was not saved: ${errorMessage(error)}`, "error") },
    );
  }

  function setRetired(trait: Trait, value: boolean) {
    update.mutate(
      { traitId: trait.id, changes: { retired: value } },
      {
        onSuccess: () => {
          setRetiring(null);
          toast.show(value ? `“${trait.label}” is retired; its values are kept.` : `“${trait.label}” is back in the codebook.`, value ? "info" : "success");
        },
        onError: (error) => {
          if (!value) toast.show(`“${trait.label}” was not restored: ${errorMessage(error)}`, "error");
        },
      },
    );
  }

  return (
    <>
      <PageHeader
        eyebrow={study.name}
        title="Codebook"
        description="The traits recorded for every taxon of this study: their states or units, and the rule coders follow. A new study starts empty or from the suggested codebook; edit, extend or retire traits to fit your question."
        actions={
          <>
            <a className={buttonClasses("secondary")} href={codebookCsvUrl(study.id)} download>
              Download as CSV
            </a>
            {canEdit && (
              <Button onClick={() => setEditing({ mode: "new" })} disabled={editing?.mode === "new"}>
                New trait
              </Button>
            )}
          </>
        }
      />

      {!canEdit && (
        <Notice className="mb-6">
          As {ROLE_LABELS[study.role]} you can read the codebook. Coders and study leads change it.
        </Notice>
      )}

      {editing?.mode === "new" && (
        <div className="mb-6">
          <TraitEditor studyId={study.id} onDone={() => setEditing(null)} />
        </div>
      )}

      {traits.isPending && <LoadingState label="Loading the codebook" lines={5} />}
      {traits.isError && <ErrorState error={traits.error} title="The codebook could not be loaded" onRetry={() => void traits.refetch()} />}

      {traits.isSuccess && active.length === 0 && editing?.mode !== "new" && (
        <EmptyState
          title="No traits in use"
          description={
            retired.length > 0
              ? "Every trait of this study is retired. Restore one below, or define a new trait."
              : "Define the traits you will record for each taxon: a habitat, a feeding mode, a body size."
          }
          action={canEdit ? <Button onClick={() => setEditing({ mode: "new" })}>Define the first trait</Button> : undefined}
        />
      )}

      {traits.isSuccess && active.length > 0 && (
        <Card title="Traits in use" description={`${pluralize(active.length, "trait")}, in the order of the trait table's columns.`}>
          <ol className="-my-4 divide-y divide-stone-100">
            {active.map((trait, index) =>
              editing?.mode === "edit" && editing.traitId === trait.id ? (
                <li key={trait.id} className="py-4">
                  <TraitEditor studyId={study.id} trait={trait} onDone={() => setEditing(null)} />
                </li>
              ) : (
                <li key={trait.id} className="flex gap-4 py-4" data-trait-key={trait.key}>
                  <span className="w-6 shrink-0 pt-0.5 text-right text-sm text-stone-400 tabular-nums" aria-hidden="true">
                    {index + 1}
                  </span>
                  <TraitSummary
                    trait={trait}
                    actions={
                      <>
                        <Button variant="ghost" size="sm" onClick={() => setDiscussing(trait)}>
                          Discuss<span className="sr-only"> {trait.label}</span>
                          {traitsWithOpenThreads.has(trait.id) && <span className="size-2 rounded-full bg-caution-700" role="img" aria-label="has an open thread" />}
                        </Button>
                        {canEdit && (
                          <>
                            <Button variant="ghost" size="sm" disabled={index === 0 || reorder.isPending} onClick={() => move(index, -1)} aria-label={`Move ${trait.label} up`}>
                              ↑
                            </Button>
                            <Button
                              variant="ghost"
                              size="sm"
                              disabled={index === active.length - 1 || reorder.isPending}
                              onClick={() => move(index, 1)}
                              aria-label={`Move ${trait.label} down`}
                            >
                              ↓
                            </Button>
                            <Button variant="secondary" size="sm" onClick={() => setEditing({ mode: "edit", traitId: trait.id })}>
                              Edit<span className="sr-only"> {trait.label}</span>
                            </Button>
                            <Button
                              variant="ghost"
                              size="sm"
                              className="text-stone-600"
                              onClick={() => {
                                update.reset();
                                setRetiring(trait);
                              }}
                            >
                              Retire<span className="sr-only"> {trait.label}</span>
                            </Button>
                          </>
                        )}
                      </>
                    }
                  />
                </li>
              ),
            )}
          </ol>
        </Card>
      )}

      {traits.isSuccess && retired.length > 0 && (
        <Card title="Retired traits" description="Hidden from the trait table, imports and analyses. Their values are kept and come back on restoring." className="mt-6">
          <ul className="-my-4 divide-y divide-stone-100">
            {retired.map((trait) => (
              <li key={trait.id} className="py-4 opacity-80" data-trait-key={trait.key}>
                <TraitSummary
                  trait={trait}
                  actions={
                    <>
                      {trait.retiredAt && <span className="mr-2 text-sm text-stone-500">Retired {formatDate(trait.retiredAt)}</span>}
                      {canEdit && (
                        <Button variant="secondary" size="sm" busy={update.isPending && update.variables?.traitId === trait.id} onClick={() => setRetired(trait, false)}>
                          Restore<span className="sr-only"> {trait.label}</span>
                        </Button>
                      )}
                    </>
                  }
                />
              </li>
            ))}
          </ul>
        </Card>
      )}

      <TimeBinsSummary studyId={study.id} />

      {discussing && (
        <ThreadDrawer
          studyId={study.id}
          target={{ type: "trait", id: discussing.id }}
          targetLabel={`${discussing.label} and its coding rule`}
          onClose={() => setDiscussing(null)}
        />
      )}

      <ConfirmDialog
        open={retiring !== null}
        tone="primary"
        title={`Retire “${retiring?.label ?? ""}”?`}
        confirmLabel="Retire trait"
        busy={update.isPending}
        error={update.isError ? errorMessage(update.error) : null}
        onCancel={() => setRetiring(null)}
        onConfirm={() => retiring && setRetired(retiring, true)}
      >
        <p>The trait leaves the trait table, imports and new analyses. Its values and their history are kept, and restoring it brings them back.</p>
      </ConfirmDialog>
    </>
  );
}
