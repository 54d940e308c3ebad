import type { Knex } from "knex";
import type { User } from "lucia";
import type { SiteLocation } from "@calmcrest/seeing-stats";
import type { CreateSiteInput, PatchSiteInput, SiteListItem, SiteSummaryBrief } from "@calmcrest/contracts";
import { HttpError, notFound } from "../http/errors";
import type { StoreCore } from "./core";

// Sites: rows, queries, the mapping to the engine's SiteLocation and to the contracts, and every site write.

export interface SiteRow {
  id: number;
  name: string;
  latitude: number;
  longitude: number;
  elevation_m: number;
  notes: string;
  created_at: string;
  updated_at: string;
}

/** The engine's site location (sun altitude, nights) of a stored site: the one row -> engine mapping. */
export function siteLocationOf(site: SiteRow): SiteLocation {
  return { latitudeDeg: site.latitude, longitudeDeg: site.longitude, elevationM: site.elevation_m };
}

/** The short site shape inside a campaign's detail. */
export function siteRef(site: SiteRow): { id: number; name: string; latitude: number; longitude: number; elevationM: number } {
  return { id: site.id, name: site.name, latitude: site.latitude, longitude: site.longitude, elevationM: site.elevation_m };
}

/** One row of the site list, given the caller's visible campaigns of the site and their brief summary. */
export function siteListItem(site: SiteRow, campaignCount: number, summary: SiteSummaryBrief | null, campaignCountAtSite = campaignCount): SiteListItem {
  return {
    id: site.id,
    name: site.name,
    latitude: site.latitude,
    longitude: site.longitude,
    elevationM: site.elevation_m,
    notes: site.notes,
    campaignCount,
    campaignCountAtSite,
    summary,
  };
}

/** Reads a site by id with any connection (plain knex or a write's transaction). */
export function siteRowById(knex: Knex, siteId: number): Promise<SiteRow | undefined> {
  return knex("site").where({ id: siteId }).first<SiteRow | undefined>();
}

export function sitesStore(core: StoreCore) {
  const knex = () => core.knex;

  return {
    /** The site, or a 404 naming it. */
    async require(siteId: number): Promise<SiteRow> {
      const site = core.reads.site(siteId);
      if (!site) throw notFound("That site");
      return site;
    },

    /** Every site, by name, with the ids of its campaigns the user can see (engineers: only sites where they belong to a campaign). */
    async listVisible(user: User): Promise<{ site: SiteRow; campaignIds: number[]; campaignCountAtSite: number }[]> {
      const visible = core.reads.visibleCampaignIds(user);
      const sites = await knex()("site").orderBy("name").select<SiteRow[]>("*");
      const campaigns = await knex()("campaign").select<{ id: number; site_id: number }[]>("id", "site_id").orderBy("id");
      const bySite = new Map<number, number[]>();
      const allBySite = new Map<number, number>();
      for (const campaign of campaigns) {
        allBySite.set(campaign.site_id, (allBySite.get(campaign.site_id) ?? 0) + 1);
        if (visible !== "all" && !visible.includes(campaign.id)) continue;
        const list = bySite.get(campaign.site_id) ?? [];
        list.push(campaign.id);
        bySite.set(campaign.site_id, list);
      }
      return sites
        .filter((site) => visible === "all" || bySite.has(site.id))
        .map((site) => ({ site, campaignIds: bySite.get(site.id) ?? [], campaignCountAtSite: allBySite.get(site.id) ?? 0 }));
    },

    /** The site and the ids of its campaigns the user can see; 404 if the site is invisible to the user. */
    async forUser(user: User, siteId: number): Promise<{ site: SiteRow; campaignIds: number[]; campaignCountAtSite: number }> {
      const site = core.reads.site(siteId);
      if (!site) throw notFound("That site");
      const ids = core.reads.campaignIdsOfSite(siteId);
      const visible = core.reads.visibleCampaignIds(user);
      const campaignIds = visible === "all" ? ids : ids.filter((id) => visible.includes(id));
      // An engineer sees a site only through a campaign there they belong to.
      if (visible !== "all" && campaignIds.length === 0) throw notFound("That site");
      return { site, campaignIds, campaignCountAtSite: ids.length };
    },

    /** Creates a site with its audit row; returns its id. */
    create(actorId: string, input: CreateSiteInput, auditDetails: { demo?: boolean } = {}): Promise<number> {
      return core.write(async ({ trx, audit }) => {
        const now = new Date().toISOString();
        const [inserted] = await trx("site")
          .insert({
            name: input.name,
            latitude: input.latitude,
            longitude: input.longitude,
            elevation_m: input.elevationM,
            notes: input.notes ?? "",
            created_by: actorId,
            created_at: now,
            updated_at: now,
          })
          .returning<{ id: number }[]>("id");
        if (!inserted) throw new HttpError(500, "server_error", "The site could not be stored. Try again.");
        await audit({ userId: actorId, action: "site.create", targetType: "site", targetId: inserted.id, details: { ...input, ...auditDetails } });
        return inserted.id;
      });
    },

    /**
     * Changes a site. Moving a site that has uploads is refused (409): its stored samples carry sun altitudes
     * computed from the old coordinates, so the night filter would silently go wrong for them.
     */
    update(actorId: string, siteId: number, input: PatchSiteInput): Promise<void> {
      return core.write(async ({ trx, audit, afterCommit }) => {
        const site = await siteRowById(trx, siteId);
        if (!site) throw notFound("That site");
        const movesSite =
          (input.latitude !== undefined && input.latitude !== site.latitude) || (input.longitude !== undefined && input.longitude !== site.longitude);
        if (movesSite) {
          const upload = await trx("campaign").join("upload", "upload.campaign_id", "campaign.id").where("campaign.site_id", site.id).first();
          if (upload) {
            throw new HttpError(
              409,
              "site_has_samples",
              "This site already has uploads, whose sun altitudes were computed from its current coordinates. Create a new site for the corrected position instead.",
            );
          }
        }
        const changes: Record<string, unknown> = { updated_at: new Date().toISOString() };
        if (input.name !== undefined) changes.name = input.name;
        if (input.latitude !== undefined) changes.latitude = input.latitude;
        if (input.longitude !== undefined) changes.longitude = input.longitude;
        if (input.elevationM !== undefined) changes.elevation_m = input.elevationM;
        if (input.notes !== undefined) changes.notes = input.notes;
        await trx("site").where({ id: site.id }).update(changes);
        await audit({ userId: actorId, action: "site.update", targetType: "site", targetId: site.id, details: { ...input } });
        // The site list's briefs are keyed by site; a renamed or moved site must not answer from them.
        afterCommit(() => core.samples.briefs.clear());
      });
    },
  };
}

export type SitesStore = ReturnType<typeof sitesStore>;
