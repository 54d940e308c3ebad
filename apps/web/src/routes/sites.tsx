import { useCallback, useMemo, useState } from "react";
import { useSuspenseQuery } from "@tanstack/react-query";
import { Link, useNavigate } from "react-router-dom";
import { createColumnHelper } from "@tanstack/react-table";
import type { SiteListItem } from "@calmcrest/contracts";
import { meQuery } from "../api/auth";
import { configQuery, sitesQuery } from "../api/sites";
import { DataTable } from "../components/data-table";
import { Notice, Page } from "../components/page";
import { OnDemandSiteMap } from "../components/on-demand";
import { SeeingLegend, type MapTiles } from "../components/seeing-legend";
import { formatArcsec, formatNumber } from "../lib/format";
import { seeingColour } from "../lib/colour-scale";
import { NewSiteForm } from "../components/new-site-forms";

const column = createColumnHelper<SiteListItem>();
const columns = [
  column.accessor("name", {
    header: "Site",
    cell: (cell) => (
      <span className="flex items-center gap-2">
        <span
          aria-hidden="true"
          className="inline-block h-3 w-3 shrink-0 rounded-full border border-ink"
          style={cell.row.original.summary ? { background: seeingColour(cell.row.original.summary.median) } : { borderStyle: "dashed" }}
        />
        <Link to={`/sites/${cell.row.original.id}`} className="whitespace-nowrap font-semibold text-accent underline-offset-2 hover:underline">
          {cell.getValue()}
        </Link>
      </span>
    ),
  }),
  column.accessor("elevationM", { header: "Elevation", meta: { unit: "m", numeric: true }, cell: (cell) => formatNumber(cell.getValue()) }),
  column.accessor((site) => site.summary?.median, {
    id: "median",
    header: "Median seeing",
    meta: { unit: "arcsec", numeric: true },
    cell: (cell) => {
      const site = cell.row.original;
      // An engineer may see one of a site's campaigns: the figure must not pass for the whole site's.
      return site.campaignCount < site.campaignCountAtSite && site.summary ? (
        <span className="inline-flex flex-col items-end">
          <span>{formatArcsec(cell.getValue())}</span>
          <span className="text-xs font-normal whitespace-nowrap text-ink-soft">
            from {site.campaignCount} of {site.campaignCountAtSite} campaigns at this site
          </span>
        </span>
      ) : (
        formatArcsec(cell.getValue())
      );
    },
  }),
  column.accessor((site) => site.summary?.p25, { id: "p25", header: "25th pct.", meta: { unit: "arcsec", numeric: true }, cell: (cell) => formatArcsec(cell.getValue()) }),
  column.accessor((site) => site.summary?.p75, { id: "p75", header: "75th pct.", meta: { unit: "arcsec", numeric: true }, cell: (cell) => formatArcsec(cell.getValue()) }),
  column.accessor((site) => site.summary?.nights, { id: "nights", header: "Nights", meta: { numeric: true }, cell: (cell) => formatNumber(cell.getValue()) }),
  column.accessor("campaignCount", { header: "Campaigns", meta: { numeric: true } }),
];

export function SitesPage() {
  const { data: sites } = useSuspenseQuery(sitesQuery);
  const { data: me } = useSuspenseQuery(meQuery);
  const navigate = useNavigate();
  const [hoveredSiteId, setHoveredSiteId] = useState<number | null>(null);
  // Stable, so the markers' keyboard listeners are not rebound on every hover.
  const openSite = useCallback((siteId: number) => void navigate(`/sites/${siteId}`), [navigate]);
  // Online tiles only where the deployment configured a tile server (CALMCREST_TILE_URL); otherwise the shipped outlines.
  const { data: config } = useSuspenseQuery(configQuery);
  const tiles: MapTiles | null = config.mapTiles;
  const withData = useMemo(() => sites.filter((site) => site.summary).length, [sites]);

  return (
    <Page
      title="Sites"
      intro="Candidate sites and their median seeing (at zenith, 500 nm, default filters) over every campaign you can see. Hover or Tab to a marker for its figures; click it, press Enter on it, or choose a name to open the site."
    >
      {sites.length === 0 ? (
        <Notice title="No sites to show yet.">
          {me?.role === "engineer"
            ? "You see the sites of the campaigns you are a member of. Ask the survey lead or an administrator to add you to your campaign."
            : "Survey leads and administrators add candidate sites; each site then gets a campaign per monitor deployment, and field engineers upload its logs."}
        </Notice>
      ) : (
        <div className="grid grid-cols-[minmax(0,1fr)] gap-6 xl:grid-cols-[minmax(0,1fr)_minmax(0,1.3fr)]">
          {/* minmax(0, …) columns at every width: a grid item may not grow past the page for its widest content (the table). */}
          <section aria-labelledby="map-heading" className="space-y-3">
            <h2 id="map-heading" className="sr-only">
              Map of sites
            </h2>
            <OnDemandSiteMap sites={sites} tiles={tiles} highlightedSiteId={hoveredSiteId} onHover={setHoveredSiteId} onOpen={openSite} />
            <SeeingLegend />
            <p className="text-sm text-ink-soft">
              {withData} of {sites.length} sites have seeing data. {tiles ? "Map tiles from the configured tile server." : "Country outlines: Natural Earth, 1:110 million (shipped with Calmcrest, no network needed)."}
            </p>
          </section>
          <section aria-labelledby="table-heading" className="space-y-3">
            <h2 id="table-heading" className="text-lg font-semibold">
              The same sites as a table
            </h2>
            <DataTable
              caption="Candidate sites with their median seeing"
              columns={columns}
              data={sites}
              initialSorting={[{ id: "median", desc: false }]}
              getRowId={(site) => String(site.id)}
              highlightedRowId={hoveredSiteId === null ? null : String(hoveredSiteId)}
              onRowHover={(rowId) => setHoveredSiteId(rowId === null ? null : Number(rowId))}
            />
          </section>
        </div>
      )}
      {me?.role === "lead" || me?.role === "admin" ? (
        <div className="mt-6">
          <NewSiteForm />
        </div>
      ) : null}
    </Page>
  );
}
