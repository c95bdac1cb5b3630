import { can, ROLE_LABELS, ROLE_SUMMARIES, STUDY_ROLES } from "@shared/roles";
import { Card } from "../../components/Card";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { PageHeader } from "../../components/PageHeader";
import { RoleBadge } from "../../components/RoleBadge";
import { useCurrentStudy } from "../../lib/currentStudy";
import { formatDate } from "../../lib/format";
import { useMe } from "../../lib/session";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useMembers, type PendingInvitation } from "../../lib/queries/members";
import { InviteCard } from "./InviteCard";
import { MemberList } from "./MemberList";

export function MembersPage() {
  const study = useCurrentStudy();
  useDocumentTitle(`Members · ${study.name}`);
  const me = useMe();
  const members = useMembers(study.id);
  const canManage = can(study.role, "members.manage");

  return (
    <>
      <PageHeader
        eyebrow={study.name}
        title="Members"
        description={canManage ? "Invite people by e-mail and give each a role in this study." : "The people working on this study and their roles."}
      />
      <div className="grid gap-6 xl:grid-cols-[minmax(0,1fr)_18rem]">
        <div className="min-w-0 space-y-6">
          {canManage && <InviteCard studyId={study.id} outboxAvailable={me.data?.environment !== "production"} />}
          {members.isPending && <LoadingState label="Loading members" />}
          {members.isError && <ErrorState error={members.error} title="The members could not be loaded" onRetry={() => void members.refetch()} />}
          {members.isSuccess && me.data && (
            <>
              <MemberList study={study} members={members.data.members} myUserId={me.data.user.id} canManage={canManage} />
              <PendingInvitations invitations={members.data.invitations} />
            </>
          )}
        </div>
        <RoleGuide />
      </div>
    </>
  );
}

function PendingInvitations({ invitations }: { invitations: PendingInvitation[] }) {
  return (
    <Card title="Pending invitations" description="Sent but not accepted yet.">
      {invitations.length === 0 ? (
        <p className="text-[15px] text-stone-500">No invitations are waiting.</p>
      ) : (
        <ul className="-my-3 divide-y divide-stone-100">
          {invitations.map((invitation) => (
            <li key={invitation.id} className="flex flex-col gap-2 py-3 sm:flex-row sm:items-center sm:justify-between">
              <div className="min-w-0">
                <p className="truncate font-medium text-stone-900">{invitation.email}</p>
                <p className="text-sm text-stone-500 tabular-nums">
                  Sent {formatDate(invitation.createdAt)} · valid until {formatDate(invitation.expiresAt)}
                </p>
              </div>
              <RoleBadge role={invitation.role} className="self-start sm:self-center" />
            </li>
          ))}
        </ul>
      )}
    </Card>
  );
}

function RoleGuide() {
  return (
    <Card title="Roles" className="self-start">
      <dl className="space-y-3 text-sm">
        {STUDY_ROLES.map((role) => (
          <div key={role}>
            <dt className="font-semibold text-stone-900">{ROLE_LABELS[role]}</dt>
            <dd className="text-stone-600">{ROLE_SUMMARIES[role]}</dd>
          </div>
        ))}
      </dl>
    </Card>
  );
}
