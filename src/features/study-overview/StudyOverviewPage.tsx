import { useState } from "react";
import { useNavigate } from "react-router-dom";
import { can, ROLE_SUMMARIES } from "@shared/roles";
import { studyUpdateSchema, type Study } from "@shared/schemas/studies";
import { Button } from "../../components/Button";
import { Card } from "../../components/Card";
import { ConfirmDialog } from "../../components/ConfirmDialog";
import { FormError } from "../../components/Notice";
import { PageHeader } from "../../components/PageHeader";
import { RoleBadge } from "../../components/RoleBadge";
import { TextArea, TextField } from "../../components/TextField";
import { TextLink } from "../../components/TextLink";
import { useToast } from "../../components/Toast";
import { errorMessage } from "../../lib/api";
import { useCurrentStudy } from "../../lib/currentStudy";
import { formatDate, pluralize } from "../../lib/format";
import { formLevelMessage, useZodForm } from "../../lib/forms";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { ActivityFeed } from "./ActivityFeed";
import { useDeleteStudy, useUpdateStudy } from "./api";
import { FirstSteps } from "./FirstSteps";
import { MainBoundaryCard } from "./MainBoundaryCard";
import { MentionEmailsCard } from "./MentionEmailsCard";

export function StudyOverviewPage() {
  const study = useCurrentStudy();
  useDocumentTitle(study.name);
  const canEdit = can(study.role, "study.update");
  const canDelete = can(study.role, "study.delete");

  return (
    <>
      <PageHeader eyebrow="Study overview" title={study.name} />
      <div className="grid gap-6 xl:grid-cols-[minmax(0,1fr)_18rem]">
        <div className="min-w-0 space-y-6">
          <FirstSteps study={study} />
          <Card title="About this study">
            {study.description ? (
              <p className="max-w-prose text-[15px] whitespace-pre-line text-stone-700">{study.description}</p>
            ) : (
              <p className="text-[15px] text-stone-500 italic">
                No description yet.{canEdit ? " Add the question, clade or region and the boundaries of interest below." : ""}
              </p>
            )}
          </Card>
          <MainBoundaryCard study={study} canEdit={canEdit} />
          <ActivityFeed studyId={study.id} />
          {canEdit && <EditStudyCard key={study.id} study={study} />}
          {canDelete && <DeleteStudyCard study={study} />}
          {!canEdit && <p className="text-sm text-stone-500">Only the study lead can change the name and description.</p>}
        </div>
        <div className="min-w-0 space-y-6 self-start">
          <StudyFacts study={study} />
          <MentionEmailsCard studyId={study.id} />
        </div>
      </div>
    </>
  );
}

function StudyFacts({ study }: { study: Study }) {
  return (
    <Card title="At a glance">
      <dl className="space-y-4 text-[15px]">
        <div>
          <dt className="text-sm text-stone-500">Your role</dt>
          <dd className="mt-1">
            <RoleBadge role={study.role} />
            <p className="mt-1 text-sm text-stone-600">{ROLE_SUMMARIES[study.role]}</p>
          </dd>
        </div>
        <div>
          <dt className="text-sm text-stone-500">Members</dt>
          <dd className="mt-1 tabular-nums">
            <TextLink to={paths.studyMembers(study.id)}>{pluralize(study.memberCount, "member")}</TextLink>
          </dd>
        </div>
        <div>
          <dt className="text-sm text-stone-500">Created</dt>
          <dd className="mt-1 tabular-nums">{formatDate(study.createdAt)}</dd>
        </div>
        <div>
          <dt className="text-sm text-stone-500">Last changed</dt>
          <dd className="mt-1 tabular-nums">{formatDate(study.updatedAt)}</dd>
        </div>
      </dl>
    </Card>
  );
}

function EditStudyCard({ study }: { study: Study }) {
  const update = useUpdateStudy(study.id);
  const form = useZodForm(studyUpdateSchema, { name: study.name, description: study.description });
  const unchanged = form.values.name === study.name && form.values.description === study.description;

  const submit = form.handleSubmit((input) => update.mutate(input, { onError: form.showServerErrors }));

  return (
    <Card title="Study details" description="The name and description every member sees.">
      <FormError message={formLevelMessage(update.error)} className="mb-5" />
      <form noValidate onSubmit={submit} className="space-y-5">
        <TextField label="Name" {...form.field("name")} />
        <TextArea label="Description" optional rows={5} {...form.field("description")} />
        <div className="flex flex-wrap items-center justify-end gap-4">
          {update.isSuccess && unchanged && (
            <p role="status" className="text-sm font-medium text-accent-700">
              Saved.
            </p>
          )}
          <Button type="submit" busy={update.isPending} disabled={unchanged}>
            Save changes
          </Button>
        </div>
      </form>
    </Card>
  );
}

function DeleteStudyCard({ study }: { study: Study }) {
  const [confirming, setConfirming] = useState(false);
  const [typedName, setTypedName] = useState("");
  const remove = useDeleteStudy(study.id);
  const navigate = useNavigate();
  const toast = useToast();

  const close = () => {
    setConfirming(false);
    setTypedName("");
    remove.reset();
  };

  return (
    <Card title="Delete this study" tone="danger">
      <p className="text-[15px] text-stone-700">
        Deleting removes the study and everything in it for every member: its members, invitations and all data. It cannot be undone.
      </p>
      <Button variant="danger" className="mt-4" onClick={() => setConfirming(true)}>
        Delete study…
      </Button>
      <ConfirmDialog
        open={confirming}
        title={`Delete “${study.name}”?`}
        confirmLabel="Delete study"
        busy={remove.isPending}
        confirmDisabled={typedName.trim() !== study.name.trim()}
        error={remove.error ? errorMessage(remove.error) : null}
        onCancel={close}
        onConfirm={() =>
          remove.mutate(undefined, {
            onSuccess: () => {
              toast.show(`Study “${study.name}” was deleted.`, "info");
              navigate(paths.home, { replace: true });
            },
          })
        }
      >
        <p>All of the study’s data and memberships will be removed for everyone. This cannot be undone.</p>
        <TextField
          label="Type the study’s name to confirm"
          hint={<span className="font-medium text-stone-700">{study.name}</span>}
          value={typedName}
          onChange={(event) => setTypedName(event.target.value)}
          autoComplete="off"
        />
      </ConfirmDialog>
    </Card>
  );
}
