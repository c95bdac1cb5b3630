import { desc } from "drizzle-orm";
import type { Database } from "../db";
import { outboxMessages } from "../../db/schema/index";
import type { OutboxMessage } from "../../shared/schemas/outbox";

export function createOutboxService(db: Database) {
  return {
    async list(limit = 100): Promise<OutboxMessage[]> {
      const rows = await db.select().from(outboxMessages).orderBy(desc(outboxMessages.receivedAt)).limit(limit);
      return rows.map((r) => ({ id: r.id, from: r.fromAddress, to: r.toAddresses, subject: r.subject, text: r.text, receivedAt: r.receivedAt.toISOString() }));
    },
  };
}
