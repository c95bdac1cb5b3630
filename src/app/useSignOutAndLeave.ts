import { useQueryClient } from "@tanstack/react-query";
import { useNavigate } from "react-router-dom";
import { useToast } from "../components/Toast";
import { useSignOut } from "../features/auth/api";
import { errorMessage } from "../lib/api";
import { paths } from "../lib/paths";

/** Signs out, leaves for the sign-in page and forgets everything cached for this account. */
export function useSignOutAndLeave() {
  const signOut = useSignOut();
  const navigate = useNavigate();
  const queryClient = useQueryClient();
  const toast = useToast();
  return {
    pending: signOut.isPending,
    signOut: () =>
      signOut.mutate(undefined, {
        onSuccess: () => {
          navigate(paths.signIn, { replace: true });
          queryClient.removeQueries();
          toast.show("You are signed out.", "info");
        },
        onError: (error) => toast.show(`Signing out failed: ${errorMessage(error)}`, "error"),
      }),
  };
}
