import { matchPath } from "react-router-dom";

/** Pages anyone may open signed out; a 401 there means "signed out", not "sign in first". */
export const PUBLIC_ROUTES = {
  signIn: "/sign-in",
  signUp: "/sign-up",
  forgotPassword: "/forgot-password",
  resetPassword: "/reset-password/:token",
  invitation: "/invitations/:token",
} as const;

export function isPublicPath(pathname: string): boolean {
  return Object.values(PUBLIC_ROUTES).some((pattern) => matchPath(pattern, pathname) !== null);
}
