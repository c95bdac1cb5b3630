import { useNavigate, useSearchParams } from "react-router-dom";
import { PASSWORD_MIN_LENGTH, signupSchema } from "@shared/schemas/auth";
import { Button } from "../../components/Button";
import { FormError, Notice } from "../../components/Notice";
import { PasswordField, TextField } from "../../components/TextField";
import { TextLink, textLinkClasses } from "../../components/TextLink";
import { useToast } from "../../components/Toast";
import { formLevelMessage, useZodForm } from "../../lib/forms";
import { paths, safeNextPath, withNext } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useSignUp } from "./api";
import { AuthHeading } from "./AuthHeading";

export function SignUpPage() {
  useDocumentTitle("Create an account");
  const [params] = useSearchParams();
  const next = safeNextPath(params.get("next"));
  const navigate = useNavigate();
  const toast = useToast();
  const signUp = useSignUp();
  const form = useZodForm(signupSchema, { name: "", email: params.get("email") ?? "", password: "" });

  const submit = form.handleSubmit((input) => {
    signUp.mutate(input, {
      onSuccess: (answer) => {
        if ("status" in answer) return; // no session: the page turns to "check your e-mail"
        toast.show(`Welcome to Stratasieve, ${answer.name}.`);
        navigate(next, { replace: true });
      },
      onError: form.showServerErrors,
    });
  });

  if (signUp.isSuccess && "status" in signUp.data) {
    return (
      <>
        <AuthHeading title="Check your e-mail" />
        <Notice tone="success">
          We sent a message to <strong className="font-semibold">{signUp.data.email}</strong> that tells you how to continue.
        </Notice>
        <p className="mt-6 text-[15px] text-stone-600">
          Nothing arrived? Look in the spam folder, or{" "}
          <button type="button" onClick={() => signUp.reset()} className={textLinkClasses}>
            check the address and try again
          </button>
          .
        </p>
        <p className="mt-6 border-t border-stone-100 pt-5 text-center text-[15px] text-stone-600">
          <TextLink to={withNext(paths.signIn, next, { email: signUp.data.email })}>Sign in</TextLink> or{" "}
          <TextLink to={paths.forgotPassword}>reset your password</TextLink>
        </p>
      </>
    );
  }

  return (
    <>
      <AuthHeading title="Create an account">
        One account for every study you lead or join. Roles are given per study, by its study lead.
      </AuthHeading>
      <FormError message={formLevelMessage(signUp.error)} className="mb-5" />
      <form noValidate onSubmit={submit} className="space-y-5">
        <TextField label="Name" autoComplete="name" hint="Shown to the people you work with." {...form.field("name")} />
        <TextField label="E-mail" type="email" autoComplete="email" inputMode="email" {...form.field("email")} />
        <PasswordField label="Password" autoComplete="new-password" hint={`At least ${PASSWORD_MIN_LENGTH} characters.`} {...form.field("password")} />
        <Button type="submit" busy={signUp.isPending} className="w-full">
          Create account
        </Button>
      </form>
      <p className="mt-6 border-t border-stone-100 pt-5 text-center text-[15px] text-stone-600">
        Already have an account? <TextLink to={withNext(paths.signIn, next)}>Sign in</TextLink>
      </p>
    </>
  );
}
