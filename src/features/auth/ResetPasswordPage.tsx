import { useParams } from "react-router-dom";
import { PASSWORD_MIN_LENGTH, passwordResetConfirmSchema } from "@shared/schemas/auth";
import { Button, ButtonLink } from "../../components/Button";
import { FormError, Notice } from "../../components/Notice";
import { PasswordField } from "../../components/TextField";
import { TextLink } from "../../components/TextLink";
import { ApiError } from "../../lib/api";
import { formLevelMessage, useZodForm } from "../../lib/forms";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useConfirmPasswordReset } from "./api";
import { AuthHeading } from "./AuthHeading";

export function ResetPasswordPage() {
  useDocumentTitle("Choose a new password");
  const { token = "" } = useParams();
  const confirm = useConfirmPasswordReset();
  // The token travels with the form so the shared schema checks it like the server does.
  const form = useZodForm(passwordResetConfirmSchema, { token, password: "" });

  const submit = form.handleSubmit((input) => confirm.mutate(input, { onError: form.showServerErrors }));

  if (confirm.isSuccess) {
    return (
      <>
        <AuthHeading title="Password changed" />
        <Notice tone="success">Your new password is set. Sign in with it now.</Notice>
        <ButtonLink to={paths.signIn} className="mt-6 w-full">
          Sign in
        </ButtonLink>
      </>
    );
  }

  const linkProblem = form.errors.token ?? (confirm.error instanceof ApiError && confirm.error.code === "invalid_token" ? confirm.error.message : null);

  return (
    <>
      <AuthHeading title="Choose a new password">The link from your e-mail lets you set a new password once.</AuthHeading>
      {linkProblem ? (
        <Notice tone="error" title="This link cannot be used" className="mb-5">
          <p>{linkProblem}</p>
          <p className="mt-2">
            <TextLink to={paths.forgotPassword}>Ask for a new link</TextLink>
          </p>
        </Notice>
      ) : (
        <FormError message={formLevelMessage(confirm.error)} className="mb-5" />
      )}
      <form noValidate onSubmit={submit} className="space-y-5">
        <PasswordField label="New password" autoComplete="new-password" hint={`At least ${PASSWORD_MIN_LENGTH} characters.`} {...form.field("password")} />
        <Button type="submit" busy={confirm.isPending} className="w-full">
          Set new password
        </Button>
      </form>
    </>
  );
}
