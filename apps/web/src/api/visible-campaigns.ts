import { useQueries, useSuspenseQuery } from "@tanstack/react-query";
import { siteQuery, sitesQuery } from "./sites";

/** Every campaign the signed-in user can see, with its site's name (from the site details, which list them). */
export function useVisibleCampaigns() {
  const { data: sites } = useSuspenseQuery(sitesQuery);
  const details = useQueries({ queries: sites.map((site) => siteQuery(site.id)) });
  const pending = details.some((detail) => detail.isPending);
  const campaigns = details.flatMap((detail) => (detail.data ? detail.data.campaigns.map((campaign) => ({ ...campaign, siteName: detail.data.name })) : []));
  return { campaigns, pending, sites };
}
