import { accountUpdateSchema, PASSWORD_MIN_LENGTH, passwordChangeSchema, type User } from "@shared/schemas/auth";
import { Button } from "../../components/Button";
import { Card } from "../../components/Card";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { FormError, Notice } from "../../components/Notice";
import { PageHeader } from "../../components/PageHeader";
import { PasswordField, TextField } from "../../components/TextField";
import { formatDate } from "../../lib/format";
import { formLevelMessage, useZodForm } from "../../lib/forms";
import { useMe } from "../../lib/session";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useChangePassword, useUpdateName } from "./api";
import { ApiTokensCard } from "./ApiTokensCard";

export function AccountPage() {
  useDocumentTitle("Account settings");
  const me = useMe();

  return (
    <div className="max-w-2xl">
      <PageHeader title="Account settings" description="Your name, password and API tokens. Roles are given per study, on each study’s Members page." />
      {me.isPending && <LoadingState label="Loading your account" />}
      {me.isError && <ErrorState error={me.error} title="Your account could not be loaded" onRetry={() => void me.refetch()} />}
      {me.isSuccess && (
        <div className="space-y-6">
          <ProfileCard key={me.data.user.id} user={me.data.user} />
          <PasswordCard />
          <ApiTokensCard />
        </div>
      )}
    </div>
  );
}

function ProfileCard({ user }: { user: User }) {
  const update = useUpdateName();
  const form = useZodForm(accountUpdateSchema, { name: user.name });
  const unchanged = form.values.name.trim() === user.name;

  const submit = form.handleSubmit((input) => update.mutate(input, { onError: form.showServerErrors }));

  return (
    <Card title="Profile">
      <dl className="mb-6 grid gap-x-6 gap-y-2 text-[15px] sm:grid-cols-[8rem_1fr]">
        <dt className="text-stone-500">E-mail</dt>
        <dd className="break-all text-stone-900">{user.email}</dd>
        <dt className="text-stone-500">Member since</dt>
        <dd className="tabular-nums">{formatDate(user.createdAt)}</dd>
      </dl>
      <FormError message={formLevelMessage(update.error)} className="mb-5" />
      <form noValidate onSubmit={submit} className="space-y-5">
        <TextField label="Name" autoComplete="name" hint="Shown to the members of your studies." {...form.field("name")} />
        <div className="flex flex-wrap items-center justify-end gap-4">
          {update.isSuccess && unchanged && (
            <p role="status" className="text-sm font-medium text-accent-700">
              Saved.
            </p>
          )}
          <Button type="submit" busy={update.isPending} disabled={unchanged}>
            Save name
          </Button>
        </div>
      </form>
    </Card>
  );
}

function PasswordCard() {
  const change = useChangePassword();
  const form = useZodForm(passwordChangeSchema, { currentPassword: "", newPassword: "" });

  const submit = form.handleSubmit((input) =>
    change.mutate(input, {
      onSuccess: () => form.reset(),
      onError: form.showServerErrors,
    }),
  );

  return (
    <Card title="Password" description="Changing it signs out every other browser where this account is signed in.">
      {change.isSuccess && (
        <Notice tone="success" className="mb-5">
          Your password was changed. Other browsers were signed out; this one stays signed in.
        </Notice>
      )}
      <FormError message={formLevelMessage(change.error)} className="mb-5" />
      <form noValidate onSubmit={submit} className="space-y-5">
        <PasswordField label="Current password" autoComplete="current-password" {...form.field("currentPassword")} />
        <PasswordField label="New password" autoComplete="new-password" hint={`At least ${PASSWORD_MIN_LENGTH} characters.`} {...form.field("newPassword")} />
        <div className="flex justify-end">
          <Button type="submit" busy={change.isPending}>
            Change password
          </Button>
        </div>
      </form>
    </Card>
  );
}
