import { queryOptions } from "@tanstack/react-query";
import type { ComparisonResponse } from "@calmcrest/contracts";
import { api } from "./client";
import { comparisonKey } from "./query-keys";

/** `GET /api/comparisons?…` (see `comparisonKey`). */
export const comparisonQuery = (queryString: string) =>
  queryOptions({
    queryKey: comparisonKey(queryString),
    queryFn: () => api<ComparisonResponse>(`/comparisons?${queryString}`),
    staleTime: 60_000,
  });
