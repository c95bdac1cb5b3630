import { useNavigate, useParams } from "react-router-dom";
import { ROLE_LABELS, ROLE_SUMMARIES } from "@shared/roles";
import type { InvitationPreview } from "@shared/schemas/studies";
import type { Me } from "@shared/schemas/auth";
import { Button, ButtonLink } from "../../components/Button";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { FormError, Notice } from "../../components/Notice";
import { RoleBadge } from "../../components/RoleBadge";
import { TextLink } from "../../components/TextLink";
import { useToast } from "../../components/Toast";
import { ApiError, errorMessage } from "../../lib/api";
import { formatDate } from "../../lib/format";
import { paths, withNext } from "../../lib/paths";
import { useOptionalMe } from "../../lib/session";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useAcceptInvitation, useInvitationPreview } from "./api";

/** Where an e-mailed invitation link lands: what the study offers, then sign in (or up) and accept. */
export function InvitationPage() {
  const { token = "" } = useParams();
  const preview = useInvitationPreview(token);
  const session = useOptionalMe();
  useDocumentTitle(preview.data ? `Invitation to ${preview.data.studyName}` : "Invitation");

  if (preview.isPending) return <LoadingState label="Opening the invitation" lines={2} />;
  if (preview.isError) {
    if (preview.error instanceof ApiError && preview.error.status === 404) return <UnusableInvitation message={preview.error.message} />;
    return <ErrorState error={preview.error} title="The invitation could not be loaded" onRetry={() => void preview.refetch()} />;
  }

  const invitation = preview.data;
  return (
    <>
      <p className="text-sm font-semibold text-accent-700">Invitation</p>
      <h1 className="mt-1 text-2xl font-semibold tracking-tight text-balance text-stone-900">Join “{invitation.studyName}”</h1>
      <p className="mt-3 text-[15px] text-stone-600">
        {invitation.invitedBy ?? "The study lead"} invited <strong className="font-medium text-stone-900">{invitation.email}</strong> to
        this study on Stratasieve.
      </p>

      <dl className="mt-6 grid grid-cols-[auto_1fr] gap-x-6 gap-y-3 rounded-xl border border-stone-200 bg-stone-50 px-5 py-4 text-[15px]">
        <dt className="text-stone-500">Role</dt>
        <dd>
          <RoleBadge role={invitation.role} />
          <p className="mt-1 text-sm text-stone-600">{ROLE_SUMMARIES[invitation.role]}</p>
        </dd>
        <dt className="text-stone-500">Valid until</dt>
        <dd className="tabular-nums">{formatDate(invitation.expiresAt)}</dd>
      </dl>

      <div className="mt-8">
        {session.me === undefined && !session.error && <LoadingState label="Checking whether you are signed in" lines={0} className="py-0" />}
        {session.error != null && <ErrorState error={session.error} title="Your sign-in could not be checked" onRetry={session.refetch} />}
        {session.me === null && <SignedOutChoices token={token} invitation={invitation} />}
        {session.me && <AcceptInvitation token={token} invitation={invitation} me={session.me} />}
      </div>
    </>
  );
}

function SignedOutChoices({ token, invitation }: { token: string; invitation: InvitationPreview }) {
  const back = paths.invitation(token);
  return (
    <div>
      <h2 className="text-base font-semibold text-stone-900">To accept, sign in or create an account</h2>
      <p className="mt-1 text-[15px] text-stone-600">You will come straight back here to accept.</p>
      <div className="mt-5 flex flex-col gap-3 sm:flex-row">
        <ButtonLink to={withNext(paths.signUp, back, { email: invitation.email })} className="flex-1">
          Create an account
        </ButtonLink>
        <ButtonLink to={withNext(paths.signIn, back, { email: invitation.email })} variant="secondary" className="flex-1">
          Sign in
        </ButtonLink>
      </div>
    </div>
  );
}

function AcceptInvitation({ token, invitation, me }: { token: string; invitation: InvitationPreview; me: Me }) {
  const accept = useAcceptInvitation(token);
  const navigate = useNavigate();
  const toast = useToast();
  const otherAddress = me.user.email.toLowerCase() !== invitation.email.toLowerCase();

  return (
    <div>
      <p className="text-[15px] text-stone-600">
        Signed in as <strong className="font-medium text-stone-900">{me.user.name}</strong> ({me.user.email}).
      </p>
      {otherAddress && (
        // The server accepts an invitation only from the account it was sent to.
        <Notice className="mt-4" title="This invitation is for another address">
          It was sent to <strong className="font-semibold">{invitation.email}</strong>; you are signed in as {me.user.email}. Sign out from
          the Account menu, then open this link again and sign in (or create an account) with {invitation.email}.
        </Notice>
      )}
      <FormError message={accept.error ? errorMessage(accept.error) : null} className="mt-4" />
      {!otherAddress && (
        <Button
          className="mt-5 w-full"
          busy={accept.isPending}
          onClick={() =>
            accept.mutate(undefined, {
              onSuccess: (result) => {
                toast.show(`You joined “${invitation.studyName}” as ${ROLE_LABELS[result.role]}.`);
                navigate(paths.study(result.studyId), { replace: true });
              },
            })
          }
        >
          Accept and open the study
        </Button>
      )}
    </div>
  );
}

function UnusableInvitation({ message }: { message: string }) {
  return (
    <>
      <h1 className="text-2xl font-semibold tracking-tight text-stone-900">This invitation cannot be used</h1>
      <p className="mt-3 text-[15px] text-stone-600">{message}</p>
      <p className="mt-6 text-[15px] text-stone-600">
        Already a member? <TextLink to={paths.home}>Go to your studies</TextLink>
      </p>
    </>
  );
}
