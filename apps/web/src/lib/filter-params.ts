import { summaryQuerySchema, type SummaryQuery } from "@calmcrest/contracts";

/** The summary filters as they appear in the page address, so a filtered view can be bookmarked and shared. */
export const FILTER_PARAM_NAMES = ["from", "to", "maxZenithDeg", "sunMaxDeg", "minFlux", "keepAnisotropic"] as const;
export type FilterParamName = (typeof FILTER_PARAM_NAMES)[number];

/**
 * Reads the filters from search params. Each value is checked on its own with the shared schema, so one
 * mistyped value in a pasted link drops only that value (the problem is reported) instead of the whole view.
 */
export function filtersFromParams(params: URLSearchParams): { filters: SummaryQuery; problems: string[] } {
  const filters: SummaryQuery = {};
  const problems: string[] = [];
  for (const name of FILTER_PARAM_NAMES) {
    const text = params.get(name);
    if (text === null || text.trim() === "") continue;
    const parsed = summaryQuerySchema.safeParse({ [name]: text.trim() });
    const value = parsed.success ? parsed.data[name] : undefined;
    if (value === undefined) {
      problems.push(parsed.success ? `${name} was ignored.` : `${name} "${text}" was ignored: ${parsed.error.issues[0]?.message ?? "not valid"}`);
      continue;
    }
    Object.assign(filters, { [name]: value });
  }
  if (filters.from && filters.to && filters.from > filters.to) {
    problems.push(`The date window ends (${filters.to}) before it starts (${filters.from}); both dates were ignored.`);
    delete filters.from;
    delete filters.to;
  }
  return { filters, problems };
}

/** Writes the filters into a copy of `params`, keeping unrelated params (such as the chosen night). */
export function paramsWithFilters(params: URLSearchParams, filters: SummaryQuery): URLSearchParams {
  const next = new URLSearchParams(params);
  for (const name of FILTER_PARAM_NAMES) {
    const value = filters[name];
    if (value === undefined || value === null || value === "") next.delete(name);
    else next.set(name, String(value));
  }
  return next;
}

/** `?from=…&maxZenithDeg=…` for the summary routes, in a fixed order so equal filters give equal URLs; "" with no filters. */
export function summaryQueryString(filters: SummaryQuery): string {
  const query = paramsWithFilters(new URLSearchParams(), filters).toString();
  return query ? `?${query}` : "";
}

/** True when any filter differs from the server's defaults (then the page says the figures are filtered). */
export const hasFilters = (filters: SummaryQuery) => FILTER_PARAM_NAMES.some((name) => filters[name] !== undefined);
