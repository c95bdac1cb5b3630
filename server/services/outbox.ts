import { and, desc, gte, sql } from "drizzle-orm";
import type { Database } from "../db";
import { outboxMessages } from "../../db/schema/index";
import type { OutboxMessage } from "../../shared/schemas/outbox";

export function createOutboxService(db: Database) {
  return {
    /**
     * The messages addressed to one mailbox (compared in lower case), caught since `since`: the
     * account's creation, so mail sent to an address before anyone held it (an invitation to a
     * colleague without an account) is not handed to whoever signs up with that address first.
     */
    async listFor(recipient: { email: string; since: Date }, limit = 100): Promise<OutboxMessage[]> {
      const rows = await db
        .select()
        .from(outboxMessages)
        .where(
          and(
            sql`EXISTS (SELECT 1 FROM unnest(${outboxMessages.toAddresses}) AS recipient WHERE lower(recipient) = ${recipient.email.toLowerCase()})`,
            gte(outboxMessages.receivedAt, recipient.since),
          ),
        )
        .orderBy(desc(outboxMessages.receivedAt))
        .limit(limit);
      return rows.map((r) => ({ id: r.id, from: r.fromAddress, to: r.toAddresses, subject: r.subject, text: r.text, receivedAt: r.receivedAt.toISOString() }));
    },
  };
}
