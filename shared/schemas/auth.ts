import { z } from "zod";
import { isoDateSchema, oneLine } from "./common";

export const PASSWORD_MIN_LENGTH = 10;

/** E-mail addresses are compared trimmed and in lower case. */
export const emailSchema = z
  .string({ message: "E-mail is required" })
  .trim()
  .toLowerCase()
  .pipe(z.email({ message: "Enter a valid e-mail address" }).max(254, "E-mail is too long"));

export const passwordSchema = z
  .string({ message: "Password is required" })
  .min(PASSWORD_MIN_LENGTH, `Password must have at least ${PASSWORD_MIN_LENGTH} characters`)
  .max(200, "Password must have at most 200 characters");

export const personNameSchema = z
  .string({ message: "Name is required" })
  .trim()
  .min(1, "Name is required")
  .max(120, "Name must have at most 120 characters")
  .check(oneLine("Name"));

export const signupSchema = z
  .strictObject({ email: emailSchema, password: passwordSchema, name: personNameSchema })
  .meta({ id: "SignupRequest" });
export type SignupInput = z.infer<typeof signupSchema>;

export const loginSchema = z
  .strictObject({ email: emailSchema, password: z.string().min(1, "Password is required") })
  .meta({ id: "LoginRequest" });
export type LoginInput = z.infer<typeof loginSchema>;

export const passwordResetRequestSchema = z.strictObject({ email: emailSchema }).meta({ id: "PasswordResetRequest" });

export const passwordResetConfirmSchema = z
  .strictObject({ token: z.string().min(16, "The reset link is incomplete"), password: passwordSchema })
  .meta({ id: "PasswordResetConfirm" });

export const passwordChangeSchema = z
  .strictObject({ currentPassword: z.string().min(1, "Current password is required"), newPassword: passwordSchema })
  .meta({ id: "PasswordChange" });

export const accountUpdateSchema = z.strictObject({ name: personNameSchema }).meta({ id: "AccountUpdate" });

export const userSchema = z
  .object({ id: z.uuid(), email: z.string(), name: z.string(), createdAt: isoDateSchema })
  .meta({ id: "User" });
export type User = z.infer<typeof userSchema>;

/**
 * The answer to a sign-up whose e-mail already has an account: no session, and a notice mailed to
 * that address. Same status (201) as a new account, so the form cannot be used to ask whether an
 * address is registered without being told to look in that address's mail.
 */
export const signupCheckMailSchema = z
  .object({ status: z.literal("check_mail"), email: z.string() })
  .meta({ id: "SignupCheckMail" });
export type SignupCheckMail = z.infer<typeof signupCheckMailSchema>;

/** A new address gets its account and a session at once (a User); a registered one, `check_mail`. */
export const signupAnswerSchema = z.union([userSchema, signupCheckMailSchema]).meta({ id: "SignupAnswer" });
export type SignupAnswer = z.infer<typeof signupAnswerSchema>;

export const meSchema = z.object({ user: userSchema, environment: z.enum(["production", "development", "test"]) }).meta({ id: "Me" });
export type Me = z.infer<typeof meSchema>;

/** Who is signed in in this browser, `user: null` when nobody is: asking is never an error. */
export const sessionSchema = z.object({ user: userSchema.nullable(), environment: meSchema.shape.environment }).meta({ id: "Session" });
export type Session = z.infer<typeof sessionSchema>;
