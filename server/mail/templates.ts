// The words of every e-mail the app sends, in one place.
import { ROLE_LABELS, type StudyRole } from "../../shared/roles";

export function invitationMail(args: { studyName: string; inviter: string; role: StudyRole; link: string; expiresAt: Date }) {
  return {
    subject: `You are invited to the study "${args.studyName}" on Stratasieve`,
    text: [
      `${args.inviter} invited you to join the study "${args.studyName}" as ${ROLE_LABELS[args.role]} (${args.role}).`,
      "",
      `Accept the invitation: ${args.link}`,
      "",
      `The link works once and until ${args.expiresAt.toUTCString()}. If you did not expect it, ignore this message.`,
    ].join("\n"),
  };
}

export function passwordResetMail(args: { link: string }) {
  return {
    subject: "Reset your Stratasieve password",
    text: [
      "Someone (hopefully you) asked to reset the password of this Stratasieve account.",
      "",
      `Choose a new password: ${args.link}`,
      "",
      "The link works once, for one hour. If you did not ask for it, ignore this message; your password stays as it is.",
    ].join("\n"),
  };
}
