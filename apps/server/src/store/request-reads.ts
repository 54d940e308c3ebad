import type Database from "better-sqlite3";
import type { User } from "lucia";
import type { CampaignRow } from "./campaigns";
import type { SiteRow } from "./sites";

/**
 * The small reads nearly every request makes (a site, its campaigns, a campaign, an engineer's memberships) as
 * prepared statements on the read connection. Through Knex each cost about as much again in query building,
 * pooling and promises as the query itself, and under load that was a fifth of the main thread. Reads only: a
 * WAL snapshot of what is committed, never waiting for a writer (Knex's single connection made them wait for any
 * write in progress). Inside a write use the write's transaction, never these.
 */
export class RequestReads {
  private readonly statements = new Map<string, Database.Statement>();

  constructor(private readonly sqlite: Database.Database) {}

  site(siteId: number): SiteRow | undefined {
    return this.statement("SELECT * FROM site WHERE id = ?").get(siteId) as SiteRow | undefined;
  }

  campaign(campaignId: number): CampaignRow | undefined {
    return this.statement("SELECT * FROM campaign WHERE id = ?").get(campaignId) as CampaignRow | undefined;
  }

  /** Ids of every campaign at the site, ascending. */
  campaignIdsOfSite(siteId: number): number[] {
    return this.statement("SELECT id FROM campaign WHERE site_id = ? ORDER BY id").pluck().all(siteId) as number[];
  }

  /** The campaigns with these ids, ascending by id (ids that do not exist are left out). */
  campaigns(campaignIds: readonly number[]): CampaignRow[] {
    if (campaignIds.length === 0) return [];
    // One statement per list length (a site has a handful of campaigns; the map stays small).
    return this.statement(`SELECT * FROM campaign WHERE id IN (${campaignIds.map(() => "?").join(",")}) ORDER BY id`).all(...campaignIds) as CampaignRow[];
  }

  /** Ids of the campaigns the user can see, or "all" (admins and leads); engineers see the campaigns they belong to, the committee none. */
  visibleCampaignIds(user: User): number[] | "all" {
    if (user.role === "admin" || user.role === "lead") return "all";
    if (user.role !== "engineer") return [];
    return this.statement("SELECT campaign_id FROM campaign_member WHERE user_id = ?").pluck().all(user.id) as number[];
  }

  isMember(userId: string, campaignId: number): boolean {
    return this.statement("SELECT 1 FROM campaign_member WHERE user_id = ? AND campaign_id = ?").get(userId, campaignId) !== undefined;
  }

  private statement(sql: string): Database.Statement {
    let statement = this.statements.get(sql);
    if (!statement) {
      statement = this.sqlite.prepare(sql);
      this.statements.set(sql, statement);
    }
    return statement;
  }
}
