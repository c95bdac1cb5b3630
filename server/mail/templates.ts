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

/** To the owner of an address someone tried to sign up with: nothing changed, here is the way in. */
export function signupAttemptMail(args: { signInLink: string; resetLink: string }) {
  return {
    subject: "Someone tried to create a Stratasieve account with your address",
    text: [
      "Someone (perhaps you) tried to create a new Stratasieve account with this e-mail address, which already has one.",
      "No new account was made and yours is unchanged.",
      "",
      `If it was you, sign in: ${args.signInLink}`,
      `Forgot the password? Choose a new one: ${args.resetLink}`,
      "",
      "If it was not you, ignore this message.",
    ].join("\n"),
  };
}

/** One mention, sent at once to a member whose preference for the study is "immediate". */
export function mentionMail(args: { author: string; studyName: string; threadTitle: string; targetLabel: string; excerpt: string; link: string; settingsLink: string }) {
  return {
    subject: `${args.author} mentioned you in "${args.threadTitle}" (${args.studyName})`,
    text: [
      `${args.author} mentioned you in the thread "${args.threadTitle}" about ${args.targetLabel}, in the study "${args.studyName}":`,
      "",
      `> ${args.excerpt}`,
      "",
      `Open the thread: ${args.link}`,
      "",
      `You get an e-mail for each mention in this study. To get one daily digest or none, change it on the study's overview: ${args.settingsLink}`,
    ].join("\n"),
  };
}

export interface DigestItem {
  studyName: string;
  threadTitle: string;
  author: string;
  excerpt: string;
  link: string;
  at: Date;
}

/** The daily digest: every mention since the last one, grouped by study. */
export function mentionDigestMail(args: { items: DigestItem[]; settingsLink: string }) {
  const byStudy = new Map<string, DigestItem[]>();
  for (const item of args.items) byStudy.set(item.studyName, [...(byStudy.get(item.studyName) ?? []), item]);
  const count = args.items.length;
  const lines: string[] = [`You were mentioned ${count === 1 ? "once" : `${count} times`} since the last digest.`, ""];
  for (const [studyName, items] of byStudy) {
    lines.push(`Study "${studyName}"`, "");
    for (const item of items) {
      lines.push(`- ${item.author} in "${item.threadTitle}" (${item.at.toUTCString()}):`, `  > ${item.excerpt}`, `  ${item.link}`, "");
    }
  }
  lines.push(`You get this digest once a day for studies set to "daily digest". Change it on each study's overview, for example: ${args.settingsLink}`);
  return {
    subject: `Stratasieve: ${count === 1 ? "1 mention" : `${count} mentions`} since the last digest`,
    text: lines.join("\n"),
  };
}
