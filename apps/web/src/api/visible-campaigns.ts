import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { visibleCampaignsQuery } from "./campaigns";
import { sitesQuery } from "./sites";

/** Every campaign the signed-in user can see, with its site's name (GET /api/campaigns: one request), and the sites. */
export function useVisibleCampaigns() {
  const { data: sites } = useSuspenseQuery(sitesQuery);
  const list = useQuery(visibleCampaignsQuery);
  return { campaigns: list.data ?? [], pending: list.isPending, sites };
}
