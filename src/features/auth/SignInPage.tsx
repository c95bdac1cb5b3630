import { useQueryClient } from "@tanstack/react-query";
import { useNavigate, useSearchParams } from "react-router-dom";
import { loginSchema } from "@shared/schemas/auth";
import { Button } from "../../components/Button";
import { FormError } from "../../components/Notice";
import { PasswordField, TextField } from "../../components/TextField";
import { TextLink } from "../../components/TextLink";
import { formLevelMessage, useZodForm } from "../../lib/forms";
import { markListSeen, onlyStudyToOpen } from "../../lib/onlyStudy";
import { studiesQuery } from "../../lib/queries/study";
import { paths, safeNextPath, withNext } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useSignIn } from "./api";
import { AuthHeading } from "./AuthHeading";

export function SignInPage() {
  useDocumentTitle("Sign in");
  const [params] = useSearchParams();
  const next = safeNextPath(params.get("next"));
  const cameFromAPage = next !== paths.home;
  const navigate = useNavigate();
  const queryClient = useQueryClient();
  const signIn = useSignIn();
  const form = useZodForm(loginSchema, { email: params.get("email") ?? "", password: "" });

  const submit = form.handleSubmit((input) => {
    signIn.mutate(input, {
      onSuccess: (user) => {
        // Home with one study is that study (the list's own rule): go there directly, a screen sooner.
        const only = next === paths.home ? onlyStudyToOpen(user.id, queryClient.getQueryData(studiesQuery().queryKey)) : null;
        if (only) markListSeen(user.id);
        navigate(only ? paths.study(only.id) : next, { replace: true });
      },
      onError: form.showServerErrors,
    });
  });

  return (
    <>
      <AuthHeading title="Sign in">
        {cameFromAPage ? "Sign in to continue to the page you opened." : "Welcome back. Your studies are waiting where you left them."}
      </AuthHeading>
      <FormError message={formLevelMessage(signIn.error)} className="mb-5" />
      <form noValidate onSubmit={submit} className="space-y-5">
        <TextField label="E-mail" type="email" autoComplete="email" inputMode="email" {...form.field("email")} />
        <PasswordField label="Password" autoComplete="current-password" {...form.field("password")} />
        <div className="flex justify-end">
          <TextLink to={paths.forgotPassword} className="text-sm">
            Forgot your password?
          </TextLink>
        </div>
        <Button type="submit" busy={signIn.isPending} className="w-full">
          Sign in
        </Button>
      </form>
      <p className="mt-6 border-t border-stone-100 pt-5 text-center text-[15px] text-stone-600">
        New to Stratasieve? <TextLink to={withNext(paths.signUp, next)}>Create an account</TextLink>
      </p>
    </>
  );
}
