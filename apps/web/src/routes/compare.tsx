import { useMemo } from "react";
import { keepPreviousData, useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { Link, useNavigate, useSearchParams } from "react-router-dom";
import type { ComparisonResponse, SiteListItem } from "@calmcrest/contracts";
import { meQuery } from "../api/auth";
import { comparisonQuery } from "../api/comparisons";
import { configQuery } from "../api/sites";
import { useVisibleCampaigns } from "../api/visible-campaigns";
import { FilterPanel, useFilterParams } from "../components/filter-panel";
import { Notice, Page } from "../components/page";
import { OnDemandMonthlyMediansChart, OnDemandOverlaidCdfChart, OnDemandSiteMap } from "../components/on-demand";
import { SeriesLegend } from "../components/compare/series-style";
import { ComparePicker } from "../components/compare/compare-picker";
import { PairsSection, SeasonBlock } from "../components/compare/compare-sections";
import { ComparisonTable } from "../components/compare/compare-table";
import { comparisonQueryString, paramsWithSelection, selectionFromParams, type CompareSelection } from "../lib/compare-params";
import { comparisonCsv, comparisonFileName } from "../lib/comparison-csv";
import { formatDateTimeUtc, formatNumber } from "../lib/format";

/** Saves the comparison table as a CSV file (written in the browser from the answer on screen). */
function downloadCsv(comparison: ComparisonResponse) {
  const url = URL.createObjectURL(new Blob([comparisonCsv(comparison)], { type: "text/csv;charset=utf-8" }));
  const link = document.createElement("a");
  link.href = url;
  link.download = comparisonFileName(comparison);
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}

/** The compared rows as map markers, labelled with their medians (only the compared sites are on the map). */
function mapMarkers(comparison: ComparisonResponse): SiteListItem[] {
  return comparison.rows.map((row, index) => ({
    id: index + 1,
    name: row.label,
    latitude: row.site.latitude,
    longitude: row.site.longitude,
    elevationM: row.site.elevationM,
    notes: "",
    campaignCountAtSite: row.campaigns.length,
    campaignCount: row.campaigns.length,
    summary: row.statistics ? { samples: row.statistics.samples, nights: row.statistics.nights, median: row.statistics.seeing.median, p25: row.statistics.seeing.p25, p75: row.statistics.seeing.p75 } : null,
  }));
}

function Results({ comparison, stale }: { comparison: ComparisonResponse; stale: boolean }) {
  const { data: config } = useSuspenseQuery(configQuery);
  const navigate = useNavigate();
  const markers = useMemo(() => mapMarkers(comparison), [comparison]);
  const { telescope, filters, window } = comparison;
  return (
    <div className={`space-y-8 ${stale ? "opacity-60" : ""}`} aria-busy={stale}>
      <section aria-labelledby="table-heading" className="space-y-3">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <div>
            <h2 id="table-heading" className="text-lg font-semibold">
              Side by side
            </h2>
            <p className="text-sm text-ink-soft" data-testid="comparison-scope">
              {window.from ?? "first sample"} to {window.to ?? "last sample"} (UTC) · zenith limit {filters.maxZenithDeg}°, sun limit {filters.sunMaxDeg}°, flux minimum{" "}
              {filters.minFlux ?? "none"}
              {filters.standard ? " (standard filters)" : ""} · computed {formatDateTimeUtc(comparison.generatedAt)}
            </p>
          </div>
          <button type="button" onClick={() => downloadCsv(comparison)} className="rounded-md border border-line bg-panel px-4 py-1.5 text-sm font-semibold hover:bg-paper">
            Download table (CSV)
          </button>
        </div>
        {comparison.warnings.length > 0 ? (
          <Notice tone="warn" title="Read these figures with care">
            <ul className="list-disc pl-5">
              {comparison.warnings.map((warning) => (
                <li key={warning.code}>{warning.message}</li>
              ))}
            </ul>
          </Notice>
        ) : null}
        <ComparisonTable comparison={comparison} />
        <p className="max-w-4xl text-sm text-ink-soft">
          Season-balanced median: the weighted median of all samples, each weighted by 1 / (samples in its calendar month), so every covered calendar month
          counts equally; months with no samples are named under it. Predicted FWHM: the long-exposure image size the planned telescope would see at the site's
          seeing percentiles ({telescope.method}; aperture {telescope.apertureM === null ? "not given" : `${formatNumber(telescope.apertureM, 1)} m`}, band {formatNumber(telescope.bandNm)} nm, L0{" "}
          {formatNumber(telescope.outerScaleM)} m). Response coefficients used: {comparison.coefficientSets.join("; ")}.
        </p>
      </section>

      <PairsSection comparison={comparison} />
      <SeasonBlock comparison={comparison} />

      <section aria-labelledby="charts-heading" className="space-y-3">
        <h2 id="charts-heading" className="text-lg font-semibold">
          Charts
        </h2>
        <SeriesLegend rows={comparison.rows} />
        <div className="grid gap-4 lg:grid-cols-2">
          <OnDemandOverlaidCdfChart rows={comparison.rows} />
          <OnDemandMonthlyMediansChart rows={comparison.rows} />
        </div>
      </section>

      <section aria-labelledby="map-heading" className="space-y-2">
        <h2 id="map-heading" className="text-lg font-semibold">
          Where they are
        </h2>
        <OnDemandSiteMap
          sites={markers}
          tiles={config.mapTiles}
          labelled
          className="h-[320px] w-full rounded-lg border border-line md:h-[420px]"
          onOpen={(markerId) => {
            const row = comparison.rows[markerId - 1];
            if (row) void navigate(`/sites/${row.site.id}`);
          }}
        />
        <p className="text-sm text-ink-soft">Only the compared {comparison.kind === "sites" ? "sites" : "campaigns' sites"}, each labelled with its median seeing in this window. Select a marker to open its site.</p>
      </section>
    </div>
  );
}

export function ComparePage() {
  const [searchParams, setSearchParams] = useSearchParams();
  const selection = selectionFromParams(searchParams);
  const { filters } = useFilterParams();
  const { sites, campaigns, pending } = useVisibleCampaigns();
  const ready = selection.ids.length >= 2;
  const comparison = useQuery({ ...comparisonQuery(comparisonQueryString(selection, filters)), enabled: ready, placeholderData: keepPreviousData });
  const apply = (next: CompareSelection) => setSearchParams(paramsWithSelection(searchParams, next));
  const { data: me } = useSuspenseQuery(meQuery);
  const writesReports = me?.role === "lead" || me?.role === "admin";
  const pickerKey = [selection.kind, selection.ids.join(","), selection.apertureM, selection.bandNm, selection.outerScaleM, selection.pairing].join("|");

  return (
    <Page title="Compare sites" intro="Two to six candidate sites, or single campaigns, side by side over one date window: plain and paired on the nights both monitors ran, with the image size a planned telescope would see.">
      <div className="space-y-6">
        {sites.length < 2 ? (
          <Notice title="There is nothing to compare yet.">
            A comparison needs at least two sites you can see. {sites.length === 1 ? "You can see one site so far." : "You can see no site so far."} Survey leads add sites and
            campaigns under Sites; field engineers see the sites of the campaigns they belong to.
          </Notice>
        ) : (
          <ComparePicker key={pickerKey} selection={selection} sites={sites} campaigns={campaigns} campaignsPending={pending} onApply={apply} />
        )}
        <FilterPanel />
        {!ready ? (
          <Notice title="Choose what to compare.">
            Tick two to six {selection.kind === "sites" ? "sites" : "campaigns"} under "What to compare" and press Compare. The date window and filters apply to all of them; the choice stays
            in the address, so you can bookmark the comparison or send it to a colleague.
          </Notice>
        ) : comparison.isPending ? (
          <p role="status" className="flex items-center gap-2 text-ink-soft">
            <span className="inline-block h-4 w-4 animate-spin rounded-full border-2 border-accent border-t-transparent" aria-hidden="true" />
            Computing the comparison (every night-bootstrap interval is computed fresh; a few seconds for long campaigns)…
          </p>
        ) : comparison.isError ? (
          <Notice tone="bad" title="The comparison could not be made.">
            {comparison.error.message}
          </Notice>
        ) : (
          <>
            {comparison.isFetching ? (
              <p role="status" className="text-sm text-ink-soft">
                Updating the comparison for the new settings…
              </p>
            ) : null}
            {writesReports ? (
              <p>
                <Link to={`/reports?${comparisonQueryString(selection, filters)}`} className="font-semibold text-accent underline">
                  Write a report from this comparison
                </Link>{" "}
                <span className="text-sm text-ink-soft">(a draft for the committee; its numbers are frozen when you publish it)</span>
              </p>
            ) : null}
            <Results comparison={comparison.data} stale={comparison.isPlaceholderData} />
          </>
        )}
      </div>
    </Page>
  );
}
