import { passwordResetRequestSchema } from "@shared/schemas/auth";
import { Button } from "../../components/Button";
import { FormError, Notice } from "../../components/Notice";
import { TextField } from "../../components/TextField";
import { TextLink, textLinkClasses } from "../../components/TextLink";
import { formLevelMessage, useZodForm } from "../../lib/forms";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useRequestPasswordReset } from "./api";
import { AuthHeading } from "./AuthHeading";

export function ForgotPasswordPage() {
  useDocumentTitle("Reset your password");
  const request = useRequestPasswordReset();
  const form = useZodForm(passwordResetRequestSchema, { email: "" });

  const submit = form.handleSubmit((input) => request.mutate(input, { onError: form.showServerErrors }));

  if (request.isSuccess) {
    return (
      <>
        <AuthHeading title="Check your e-mail" />
        <Notice tone="success">
          If an account exists for <strong className="font-semibold">{request.variables.email}</strong>, a link to choose a new password is
          on its way. The link works once, for one hour.
        </Notice>
        <p className="mt-6 text-[15px] text-stone-600">
          Nothing arrived? Look in the spam folder, or{" "}
          <button type="button" onClick={() => request.reset()} className={textLinkClasses}>
            send it again
          </button>
          .
        </p>
        <p className="mt-6 border-t border-stone-100 pt-5 text-center text-[15px]">
          <TextLink to={paths.signIn}>Back to sign in</TextLink>
        </p>
      </>
    );
  }

  return (
    <>
      <AuthHeading title="Reset your password">Enter the e-mail of your account and we will send a link to choose a new password.</AuthHeading>
      <FormError message={formLevelMessage(request.error)} className="mb-5" />
      <form noValidate onSubmit={submit} className="space-y-5">
        <TextField label="E-mail" type="email" autoComplete="email" inputMode="email" {...form.field("email")} />
        <Button type="submit" busy={request.isPending} className="w-full">
          Send the link
        </Button>
      </form>
      <p className="mt-6 border-t border-stone-100 pt-5 text-center text-[15px] text-stone-600">
        Remembered it? <TextLink to={paths.signIn}>Sign in</TextLink>
      </p>
    </>
  );
}
