import { useQuery } from "@tanstack/react-query";
import type { OutboxMessage } from "@shared/schemas/outbox";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";

/** GET /api/outbox: messages caught by the local fake mail server (404 in production). */
export function useOutbox() {
  return useQuery({
    queryKey: queryKeys.outbox,
    queryFn: ({ signal }) => api.get<{ messages: OutboxMessage[] }>("/outbox", signal).then((r) => r.messages),
  });
}
