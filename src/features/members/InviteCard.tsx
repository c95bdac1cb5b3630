import { Link } from "react-router-dom";
import { ROLE_LABELS, ROLE_SUMMARIES, type StudyRole } from "@shared/roles";
import { invitationCreateSchema } from "@shared/schemas/studies";
import { Button } from "../../components/Button";
import { Card } from "../../components/Card";
import { FormError, Notice } from "../../components/Notice";
import { Select } from "../../components/Select";
import { TextField } from "../../components/TextField";
import { textLinkClasses } from "../../components/TextLink";
import { formLevelMessage, useZodForm } from "../../lib/forms";
import { paths } from "../../lib/paths";
import { useInviteMember } from "./api";
import { ROLE_OPTIONS } from "./roleOptions";

/** Least rights by default: the study lead raises the role on purpose. */
const DEFAULT_ROLE: StudyRole = "viewer";

export function InviteCard({ studyId, outboxAvailable }: { studyId: string; outboxAvailable: boolean }) {
  const invite = useInviteMember(studyId);
  const form = useZodForm(invitationCreateSchema, { email: "", role: DEFAULT_ROLE });
  const role = form.values.role as StudyRole;

  const submit = form.handleSubmit((input) =>
    invite.mutate(input, {
      onSuccess: () => form.reset({ email: "", role: input.role }),
      onError: form.showServerErrors,
    }),
  );

  return (
    <Card title="Invite someone" description="They get an e-mail with a link that works once, for seven days.">
      <FormError message={formLevelMessage(invite.error)} className="mb-5" />
      {invite.isSuccess && (
        <Notice tone="success" className="mb-5">
          Invitation sent to <strong className="font-semibold">{invite.variables.email}</strong> as {ROLE_LABELS[invite.variables.role as StudyRole]}.
          {outboxAvailable && (
            <>
              {" "}
              This copy of Stratasieve has no mail server: the link is printed on the server&rsquo;s console, and the person it is for finds the
              message in their own{" "}
              <Link to={paths.outbox} className={textLinkClasses}>
                Outbox
              </Link>{" "}
              if they already had an account here when it was sent.
            </>
          )}
        </Notice>
      )}
      <form noValidate onSubmit={submit} className="grid gap-5 md:grid-cols-[minmax(0,1fr)_14rem]">
        <TextField label="E-mail" type="email" inputMode="email" autoComplete="off" placeholder="name@institution.org" {...form.field("email")} />
        <Select label="Role" options={ROLE_OPTIONS} hint={ROLE_SUMMARIES[role]} {...form.field("role")} />
        <div className="md:col-span-2 md:flex md:justify-end">
          <Button type="submit" busy={invite.isPending} className="w-full md:w-auto">
            Send invitation
          </Button>
        </div>
      </form>
    </Card>
  );
}
