import type { UseQueryResult } from "@tanstack/react-query";
import type { SummaryQuery, SummaryResponse } from "@calmcrest/contracts";
import type { Scope } from "../api/samples";
import { ApiError } from "../api/client";
import { Notice } from "./page";
import { OnDemandSeeingCharts } from "./on-demand";
import { BalancedFigures, GroupFigures, SeasonsTable, TurbulenceFigures } from "./summary-details";
import { SummaryFigures } from "./summary-figures";

/**
 * Headline figures and charts of a site or a campaign, with its loading, error and empty states. Previous figures
 * stay visible (dimmed) while new filters are computed.
 */
export function SummarySection({
  summary,
  scope,
  filters,
  noDataText,
  nothingPassesText,
}: {
  summary: UseQueryResult<SummaryResponse>;
  scope: Scope;
  filters: SummaryQuery;
  /** What to do when nothing has been uploaded yet, for the reader of this page. */
  noDataText: string;
  /** What to do when samples exist but none passes the filters. */
  nothingPassesText: string;
}) {
  if (summary.isPending) {
    return (
      <p role="status" className="text-ink-soft">
        Computing the seeing statistics…
      </p>
    );
  }
  if (summary.isError) {
    return (
      <Notice tone="bad" title="The seeing statistics could not be computed.">
        {summary.error instanceof ApiError ? summary.error.message : "Reload the page to try again."}
      </Notice>
    );
  }
  const data = summary.data;
  const noData = data.samples.read === 0;
  return (
    <div className={`space-y-8 transition-opacity ${summary.isPlaceholderData ? "opacity-60" : ""}`} aria-busy={summary.isPlaceholderData}>
      <SummaryFigures summary={data} />
      {data.empty ? (
        <Notice tone={noData ? "info" : "warn"} title={noData ? "No seeing data yet." : "No sample passes these settings."}>
          {noData ? noDataText : nothingPassesText}
        </Notice>
      ) : (
        <>
          <GroupFigures summary={data} />
          <BalancedFigures summary={data} />
          <SeasonsTable summary={data} />
          <TurbulenceFigures summary={data} />
          <OnDemandSeeingCharts scope={scope} filters={filters} summary={data} />
        </>
      )}
    </div>
  );
}
