import { useNavigate, useSearchParams } from "react-router-dom";
import { PASSWORD_MIN_LENGTH, signupSchema } from "@shared/schemas/auth";
import { Button } from "../../components/Button";
import { FormError } from "../../components/Notice";
import { PasswordField, TextField } from "../../components/TextField";
import { TextLink } from "../../components/TextLink";
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
      onSuccess: (user) => {
        toast.show(`Welcome to Stratasieve, ${user.name}.`);
        navigate(next, { replace: true });
      },
      onError: form.showServerErrors,
    });
  });

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
