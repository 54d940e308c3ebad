import { queryOptions } from "@tanstack/react-query";
import type { OutboxList } from "@calmcrest/contracts";
import { api } from "./client";

export const outboxQuery = queryOptions({
  queryKey: ["outbox", "list"],
  queryFn: () => api<OutboxList>("/outbox"),
  // Messages change state on their own (sent, retried): refresh while the page is open.
  refetchInterval: 15_000,
});
