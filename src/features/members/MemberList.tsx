import { useState } from "react";
import { useNavigate } from "react-router-dom";
import { ROLE_LABELS, type StudyRole } from "@shared/roles";
import type { Member, Study } from "@shared/schemas/studies";
import { Avatar } from "../../components/Avatar";
import { Button } from "../../components/Button";
import { Card } from "../../components/Card";
import { ConfirmDialog } from "../../components/ConfirmDialog";
import { Notice } from "../../components/Notice";
import { RoleBadge } from "../../components/RoleBadge";
import { Select } from "../../components/Select";
import { useToast } from "../../components/Toast";
import { ApiError, errorMessage } from "../../lib/api";
import { formatDate, pluralize } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useChangeMemberRole, useRemoveMember } from "./api";
import { ROLE_OPTIONS } from "./roleOptions";

interface MemberListProps {
  study: Study;
  members: Member[];
  myUserId: string;
  canManage: boolean;
}

type PendingChange = { kind: "remove"; member: Member } | { kind: "demote-self"; member: Member; role: StudyRole };

export function MemberList({ study, members, myUserId, canManage }: MemberListProps) {
  const changeRole = useChangeMemberRole(study.id);
  const removeMember = useRemoveMember(study.id);
  const [pending, setPending] = useState<PendingChange | null>(null);
  const navigate = useNavigate();
  const toast = useToast();

  // The error of the last role change, shown above the list (the dialog shows removal errors).
  const roleError = changeRole.error;

  function applyRole(member: Member, role: StudyRole) {
    removeMember.reset();
    changeRole.mutate(
      { userId: member.userId, role },
      {
        onSuccess: () => {
          setPending(null);
          toast.show(`${member.name} is now ${ROLE_LABELS[role]}.`);
        },
        onError: () => setPending(null),
      },
    );
  }

  function requestRole(member: Member, role: StudyRole) {
    if (role === member.role) return;
    // Giving up one's own lead role removes the right to undo it: ask first.
    if (member.userId === myUserId && member.role === "owner") setPending({ kind: "demote-self", member, role });
    else applyRole(member, role);
  }

  function confirmRemoval(member: Member) {
    const leaving = member.userId === myUserId;
    changeRole.reset();
    removeMember.mutate(
      { userId: member.userId, leaving },
      {
        onSuccess: () => {
          setPending(null);
          if (leaving) {
            toast.show(`You left “${study.name}”.`, "info");
            navigate(paths.home, { replace: true });
          } else {
            toast.show(`${member.name} was removed from the study.`, "info");
          }
        },
      },
    );
  }

  const roleShownFor = (member: Member): StudyRole =>
    changeRole.isPending && changeRole.variables?.userId === member.userId ? changeRole.variables.role : member.role;

  return (
    <Card title="Members" description={pluralize(members.length, "person", "people")}>
      {roleError && (
        <Notice tone="error" title={roleError instanceof ApiError && roleError.code === "last_owner" ? "A study needs a study lead" : "The role was not changed"} className="mb-5">
          {errorMessage(roleError)}
        </Notice>
      )}
      <ul className="-my-3 divide-y divide-stone-100">
        {members.map((member) => {
          const isMe = member.userId === myUserId;
          return (
            <li key={member.userId} className="flex flex-col gap-3 py-3 sm:flex-row sm:items-center" data-member-email={member.email}>
              <div className="flex min-w-0 flex-1 items-center gap-3">
                <Avatar name={member.name} />
                <div className="min-w-0">
                  <p className="truncate font-medium text-stone-900">
                    {member.name}
                    {isMe && <span className="ml-2 text-sm font-normal text-stone-500">(you)</span>}
                  </p>
                  <p className="flex flex-wrap gap-x-2 text-sm text-stone-500">
                    <span className="break-all">{member.email}</span>
                    <span className="whitespace-nowrap tabular-nums">joined {formatDate(member.joinedAt)}</span>
                  </p>
                </div>
              </div>
              <div className="flex items-center gap-2 sm:shrink-0">
                {canManage ? (
                  <>
                    <Select
                      label={`Role of ${member.name}`}
                      hideLabel
                      options={ROLE_OPTIONS}
                      value={roleShownFor(member)}
                      disabled={changeRole.isPending}
                      onChange={(event) => requestRole(member, event.target.value as StudyRole)}
                      className="w-40"
                    />
                    <Button
                      variant="ghost"
                      size="sm"
                      className="text-red-700 hover:bg-red-50 hover:text-red-800"
                      onClick={() => {
                        removeMember.reset();
                        setPending({ kind: "remove", member });
                      }}
                    >
                      {isMe ? "Leave" : "Remove"}
                      <span className="sr-only"> {member.name}</span>
                    </Button>
                  </>
                ) : (
                  <RoleBadge role={member.role} />
                )}
              </div>
            </li>
          );
        })}
      </ul>

      <ConfirmDialog
        open={pending?.kind === "remove"}
        title={pending?.member.userId === myUserId ? "Leave this study?" : `Remove ${pending?.member.name ?? ""}?`}
        confirmLabel={pending?.member.userId === myUserId ? "Leave study" : "Remove"}
        busy={removeMember.isPending}
        error={removeMember.error ? errorMessage(removeMember.error) : null}
        onCancel={() => setPending(null)}
        onConfirm={() => pending && confirmRemoval(pending.member)}
      >
        {pending?.member.userId === myUserId ? (
          <p>You lose access to “{study.name}” at once. A study lead can invite you again.</p>
        ) : (
          <p>
            {pending?.member.name} ({pending?.member.email}) loses access to “{study.name}” at once. You can invite them again later.
          </p>
        )}
      </ConfirmDialog>

      <ConfirmDialog
        open={pending?.kind === "demote-self"}
        tone="primary"
        title="Give up your study lead role?"
        confirmLabel={pending?.kind === "demote-self" ? `Become ${ROLE_LABELS[pending.role]}` : "Change role"}
        busy={changeRole.isPending}
        onCancel={() => setPending(null)}
        onConfirm={() => pending?.kind === "demote-self" && applyRole(pending.member, pending.role)}
      >
        <p>You will no longer manage members, invitations or the study’s settings. Another study lead would have to give the role back.</p>
      </ConfirmDialog>
    </Card>
  );
}
