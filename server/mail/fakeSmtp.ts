// A local stand-in for a mail service: an SMTP server on loopback that keeps every message it
// receives in the outbox table, where the Outbox screen and the tests read them.
import { SMTPServer } from "smtp-server";
import { simpleParser, type AddressObject } from "mailparser";
import type { Database } from "../db";
import { outboxMessages } from "../../db/schema/index";

function addresses(field: AddressObject | AddressObject[] | undefined): string[] {
  if (!field) return [];
  const list = Array.isArray(field) ? field : [field];
  return list.flatMap((a) => a.value.map((v) => v.address ?? "")).filter(Boolean);
}

export interface FakeSmtp {
  port: number;
  close(): Promise<void>;
}

export function startFakeSmtp(db: Database): Promise<FakeSmtp> {
  const server = new SMTPServer({
    disabledCommands: ["STARTTLS"],
    authOptional: true,
    logger: false,
    size: 5 * 1024 * 1024,
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then((mail) =>
          db.insert(outboxMessages).values({
            fromAddress: addresses(mail.from)[0] ?? "",
            toAddresses: addresses(mail.to),
            subject: mail.subject ?? "",
            text: mail.text ?? "",
            html: typeof mail.html === "string" ? mail.html : null,
          }),
        )
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
