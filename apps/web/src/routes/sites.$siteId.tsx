import { keepPreviousData, useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { Link, useParams } from "react-router-dom";
import type { CampaignListItem, SummaryQuery } from "@calmcrest/contracts";
import { meQuery } from "../api/auth";
import { campaignSummaryQuery } from "../api/campaigns";
import { siteQuery, siteSummaryQuery } from "../api/sites";
import { CoverageStrip } from "../components/coverage-strip";
import { coverageRange } from "../lib/coverage";
import { FilterPanel, useFilterParams } from "../components/filter-panel";
import { MonitorSettings } from "../components/monitor-settings";
import { EditSiteForm } from "../components/edit-forms";
import { NewCampaignForm } from "../components/new-site-forms";
import { Notice, Page } from "../components/page";
import { SummarySection } from "../components/summary-section";
import { formatDateUtc, formatNumber } from "../lib/format";
import { idParam } from "../route-loaders";


function CampaignCard({ campaign, filters }: { campaign: CampaignListItem; filters: SummaryQuery }) {
  const summary = useQuery({ ...campaignSummaryQuery(campaign.id, filters), placeholderData: keepPreviousData });
  const nights = summary.data && !summary.data.empty ? summary.data.nightly.map((night) => night.night) : [];
  return (
    <article className="rounded-lg border border-line bg-panel p-4">
      <div className="mb-3 flex flex-wrap items-baseline justify-between gap-2">
        <h3 className="font-semibold">
          <Link to={`/campaigns/${campaign.id}`} className="text-accent underline-offset-2 hover:underline">
            {campaign.name}
          </Link>
        </h3>
        <span className="rounded-full bg-accent-pale px-2 py-0.5 text-xs font-semibold text-accent-strong">{campaign.status}</span>
      </div>
      <p className="mb-3 text-sm text-ink-soft">
        {formatNumber(campaign.sampleCount)} stored samples from {formatNumber(campaign.uploadCount)} {campaign.uploadCount === 1 ? "upload" : "uploads"} · data {formatDateUtc(campaign.firstSampleAt)} to {formatDateUtc(campaign.lastSampleAt)}
      </p>
      <div className="grid gap-4 md:grid-cols-[minmax(0,1fr)_minmax(0,1.4fr)]">
        <MonitorSettings monitor={campaign.monitor} />
        <div>
          <h4 className="mb-1 text-sm font-semibold">Observed nights per month</h4>
          {summary.isPending ? (
            <p className="text-sm text-ink-soft">Loading coverage…</p>
          ) : summary.isError ? (
            <p className="text-sm text-bad">Coverage could not be loaded: {summary.error.message}</p>
          ) : (
            <CoverageStrip nights={nights} {...coverageRange(campaign, filters)} label={`Observed nights per month, ${campaign.name}`} />
          )}
        </div>
      </div>
    </article>
  );
}

export function SitePage() {
  const siteId = idParam(useParams().siteId);
  const { data: site } = useSuspenseQuery(siteQuery(siteId));
  const { data: me } = useSuspenseQuery(meQuery);
  const { filters } = useFilterParams();
  const summary = useQuery({ ...siteSummaryQuery(siteId, filters), placeholderData: keepPreviousData });
  // The site detail carries no permission flags; the server lets survey leads and administrators change sites.
  const canEdit = me?.role === "lead" || me?.role === "admin";

  return (
    <Page
      title={site.name}
      intro={
        <>
          {site.latitude.toFixed(3)}°, {site.longitude.toFixed(3)}° · {formatNumber(site.elevationM)} m above sea level.{" "}
          {site.notes ? site.notes : null}
          {site.campaignCount < site.campaignCountAtSite ? (
            <span className="mt-1 block font-semibold text-ink" data-testid="partial-site">
              The figures below are from {site.campaignCount} of {site.campaignCountAtSite} campaigns at this site: the ones you belong to.
            </span>
          ) : null}
        </>
      }
      actions={
        <Link to="/sites" className="text-sm font-semibold text-accent underline">
          All sites
        </Link>
      }
    >
      <div className="space-y-8">
        <FilterPanel />
        <SummarySection
          summary={summary}
          scope={{ kind: "site", id: siteId }}
          filters={filters}
          noDataText={
            me?.role === "engineer"
              ? "No logs have been uploaded for your campaigns here yet. Upload your monitor's logs under Upload logs."
              : "No logs have been uploaded for this site yet. Field engineers upload them under Upload logs after each trip."
          }
          nothingPassesText="Widen the date window or relax the zenith, sun or flux limits above to include more samples."
        />
        <section aria-labelledby="campaigns-heading" className="space-y-3">
          <h2 id="campaigns-heading" className="text-lg font-semibold">
            Campaigns at this site
          </h2>
          {site.campaigns.length === 0 ? (
            <Notice title="No campaigns here yet.">
              A campaign is one monitor set up at this site for a period. Survey leads create campaigns; field engineers are then added to them and upload the logs.
            </Notice>
          ) : (
            <div className="grid gap-4">
              {site.campaigns.map((campaign) => (
                <CampaignCard key={campaign.id} campaign={campaign} filters={filters} />
              ))}
            </div>
          )}
          {canEdit ? <NewCampaignForm siteId={siteId} /> : null}
        </section>
        {/* The key starts a fresh form when the page moves to another site. */}
        {canEdit ? <EditSiteForm key={site.id} site={site} /> : null}
      </div>
    </Page>
  );
}
