import { queryOptions } from "@tanstack/react-query";
import type { OutboxList } from "@calmcrest/contracts";
import { api } from "./client";
import { outboxKeys } from "./query-keys";

export const outboxQuery = queryOptions({
  queryKey: outboxKeys.list(),
  queryFn: () => api<OutboxList>("/outbox"),
  // Messages change state on their own (sent, retried): refresh while the page is open.
  refetchInterval: 15_000,
});
