import { z } from "zod";
import { isoDateSchema } from "./common";

export const outboxMessageSchema = z
  .object({ id: z.uuid(), from: z.string(), to: z.array(z.string()), subject: z.string(), text: z.string(), receivedAt: isoDateSchema })
  .meta({ id: "OutboxMessage" });
export type OutboxMessage = z.infer<typeof outboxMessageSchema>;

export const outboxListSchema = z.object({ messages: z.array(outboxMessageSchema) }).meta({ id: "OutboxList" });
