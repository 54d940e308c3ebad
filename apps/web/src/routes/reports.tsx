import { Page, Notice } from "../components/page";

export function ReportsPage() {
  return (
    <Page title="Reports" intro="Site reports the survey lead has published for the site-selection committee.">
      <Notice title="No reports have been published yet.">
        When the survey lead publishes a site comparison, it appears here for reading and comments. Survey leads publish
        reports from their analysis of the campaigns.
      </Notice>
    </Page>
  );
}
