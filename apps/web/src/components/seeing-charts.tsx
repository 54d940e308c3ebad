import { keepPreviousData, useQuery } from "@tanstack/react-query";
import { useSearchParams } from "react-router-dom";
import type { SeeingStatistics, SummaryQuery } from "@calmcrest/contracts";
import { axisSamplesQuery, nightSamplesQuery, nightShown, type Scope } from "../api/samples";
import { ApiError } from "../api/client";
import { CumulativeChart, HourlyChart, MonthlyBoxChart, SeeingHistogram } from "./charts/summary-charts";
import { LongTransScatter, NightSeriesChart, type AxisSeeing } from "./charts/sample-charts";
import { ChartFrame } from "./charts/chart-frame";

function median(values: number[]): number | null {
  if (values.length === 0) return null;
  const sorted = [...values].sort((a, b) => a - b);
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1 ? (sorted[middle] ?? null) : ((sorted[middle - 1] ?? 0) + (sorted[middle] ?? 0)) / 2;
}

function SampleProblem({ title, error }: { title: string; error: unknown }) {
  return (
    <ChartFrame title={title} caption="This chart needs single samples from the server.">
      <p role="alert" className="flex h-full items-center justify-center text-center text-bad">
        {error instanceof ApiError ? error.message : "The samples could not be loaded. Reload the page to try again."}
      </p>
    </ChartFrame>
  );
}

function NightChart({ scope, filters, nights }: { scope: Scope; filters: SummaryQuery; nights: SeeingStatistics["nightly"] }) {
  const [searchParams, setSearchParams] = useSearchParams();
  const night = nightShown(nights, searchParams.get("night"));
  const series = useQuery({ ...nightSamplesQuery(scope, filters, night), enabled: Boolean(night), placeholderData: keepPreviousData });
  if (!night) return null;
  const picker = (
    <label className="flex items-center gap-2 text-sm">
      <span className="font-semibold">Night</span>
      <select
        value={night}
        onChange={(event) => {
          const next = new URLSearchParams(searchParams);
          next.set("night", event.target.value);
          setSearchParams(next, { replace: true });
        }}
        className="rounded-md border border-line bg-panel px-2 py-1"
      >
        {[...nights].reverse().map((entry) => (
          <option key={entry.night} value={entry.night}>
            {entry.night} · median {entry.median.toFixed(2)}″ · {entry.samples} samples
          </option>
        ))}
      </select>
    </label>
  );
  if (series.isError) return <SampleProblem title={`Seeing through the night of ${night}`} error={series.error} />;
  // Keyed by night: a new night starts with the whole of it in view.
  return <NightSeriesChart key={night} night={night} samples={series.data?.samples ?? []} picker={picker} loading={series.isPending} />;
}

function AxisChart({ scope, filters }: { scope: Scope; filters: SummaryQuery }) {
  const series = useQuery({ ...axisSamplesQuery(scope, filters), placeholderData: keepPreviousData });
  if (series.isError) return <SampleProblem title="Longitudinal against transverse seeing" error={series.error} />;
  const points: AxisSeeing[] = [];
  for (const sample of series.data?.samples ?? []) {
    if (sample.seeingLongArcsec !== null && sample.seeingTransArcsec !== null) points.push({ seeingLongArcsec: sample.seeingLongArcsec, seeingTransArcsec: sample.seeingTransArcsec });
  }
  const ratio = median(points.map((point) => point.seeingLongArcsec / point.seeingTransArcsec));
  return <LongTransScatter samples={points} shownCount={series.data?.samples.length ?? 0} totalCount={series.data?.total ?? 0} ratio={ratio} />;
}

/** The full set of seeing charts for a site or a campaign, all following the same filters. */
export function SeeingCharts({ scope, filters, summary }: { scope: Scope; filters: SummaryQuery; summary: SeeingStatistics }) {
  return (
    <section aria-labelledby="charts-heading" className="space-y-3">
      <h2 id="charts-heading" className="text-lg font-semibold">
        Charts
      </h2>
      <div className="grid gap-4 lg:grid-cols-2">
        <SeeingHistogram summary={summary} />
        <CumulativeChart summary={summary} />
        <MonthlyBoxChart summary={summary} />
        <HourlyChart summary={summary} />
        <NightChart scope={scope} filters={filters} nights={summary.nightly} />
        <AxisChart scope={scope} filters={filters} />
      </div>
    </section>
  );
}
