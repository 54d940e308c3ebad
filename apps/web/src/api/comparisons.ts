import { queryOptions } from "@tanstack/react-query";
import type { ComparisonResponse } from "@calmcrest/contracts";
import { api } from "./client";

/** `GET /api/comparisons?…`; the key holds the whole query string, so each bookmarked comparison caches on its own. */
export const comparisonQuery = (queryString: string) =>
  queryOptions({
    queryKey: ["comparisons", queryString],
    queryFn: () => api<ComparisonResponse>(`/comparisons?${queryString}`),
    staleTime: 60_000,
  });
