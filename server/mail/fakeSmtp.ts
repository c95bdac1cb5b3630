// A local stand-in for a mail service: an SMTP server on loopback that keeps every message it
// receives in the outbox table, where each recipient's Outbox screen and the tests read them, and
// prints each message's recipients, subject and links on the console (so a person trying the app
// alone can follow a reset or invitation link without any mail server).
import { SMTPServer } from "smtp-server";
import { simpleParser, type AddressObject } from "mailparser";
import type { Database } from "../db";
import { outboxMessages } from "../../db/schema/index";

function addresses(field: AddressObject | AddressObject[] | undefined): string[] {
  if (!field) return [];
  const list = Array.isArray(field) ? field : [field];
  return list.flatMap((a) => a.value.map((v) => v.address ?? "")).filter(Boolean);
}

const LINK = /https?:\/\/[^\s<>"]+[^\s<>".,;:!?)\]]/g;

/** The console lines for one caught message: who it is for, its subject and every link in it. */
export function describeCaughtMail(mail: { to: string[]; subject: string; text: string }): string {
  const links = [...new Set(mail.text.match(LINK) ?? [])];
  return [`[outbox] Mail to ${mail.to.join(", ") || "(nobody)"}: ${mail.subject || "(no subject)"}`, ...links.map((link) => `[outbox]   ${link}`)].join("\n");
}

export interface FakeSmtp {
  port: number;
  close(): Promise<void>;
}

/** `print` receives each caught message's console lines (none when left out, as in tests). */
export function startFakeSmtp(db: Database, print?: (lines: string) => void): Promise<FakeSmtp> {
  const server = new SMTPServer({
    disabledCommands: ["STARTTLS"],
    authOptional: true,
    logger: false,
    size: 5 * 1024 * 1024,
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then(async (mail) => {
          const caught = { to: addresses(mail.to), subject: mail.subject ?? "", text: mail.text ?? "" };
          await db.insert(outboxMessages).values({
            fromAddress: addresses(mail.from)[0] ?? "",
            toAddresses: caught.to,
            subject: caught.subject,
            text: caught.text,
            html: typeof mail.html === "string" ? mail.html : null,
          });
          print?.(describeCaughtMail(caught));
        })
        .then(() => callback(), (err: Error) => callback(err));
    },
  });
  return new Promise((resolve, reject) => {
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const address = server.server.address();
      const port = typeof address === "object" && address ? address.port : 0;
      resolve({ port, close: () => new Promise<void>((r) => server.close(() => r())) });
    });
  });
}
