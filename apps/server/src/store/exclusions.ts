import type { Knex } from "knex";
import { instantMs, type CreateExclusionInput, type Exclusion } from "@calmcrest/contracts";
import { HttpError, notFound } from "../http/errors";
import type { StoreCore } from "./core";

// Exclusion windows of a campaign: samples with from <= time < to leave every statistic.

export interface ExclusionRow {
  id: number;
  campaign_id: number;
  from_ms: number;
  to_ms: number;
  reason: string;
  created_by: string | null;
  creator_name: string | null;
  created_at: string;
}

/** Exclusion rows with their creator's name. */
export function exclusionRows(knex: Knex) {
  return knex("exclusion").leftJoin("user", "user.id", "exclusion.created_by").select<ExclusionRow[]>("exclusion.*", "user.name as creator_name");
}

export function exclusionView(row: ExclusionRow): Exclusion {
  return {
    id: row.id,
    campaignId: row.campaign_id,
    from: new Date(row.from_ms).toISOString(),
    to: new Date(row.to_ms).toISOString(),
    reason: row.reason,
    createdBy: { id: row.created_by ?? "", name: row.creator_name ?? "(deleted user)" },
    createdAt: row.created_at,
  };
}

export function exclusionsStore(core: StoreCore) {
  return {
    async listForCampaign(campaignId: number): Promise<Exclusion[]> {
      const rows = await exclusionRows(core.knex).where("exclusion.campaign_id", campaignId).orderBy("exclusion.from_ms");
      return rows.map(exclusionView);
    },

    /** Adds a window; the campaign's cached samples are dropped once it commits (summaries must see it at once). */
    async add(actorId: string, campaignId: number, input: CreateExclusionInput, auditDetails: { demo?: boolean } = {}): Promise<Exclusion> {
      const id = await core.write(async ({ trx, audit, afterCommit }) => {
        const [inserted] = await trx("exclusion")
          .insert({
            campaign_id: campaignId,
            from_ms: instantMs(input.from),
            to_ms: instantMs(input.to),
            reason: input.reason,
            created_by: actorId,
            created_at: new Date().toISOString(),
          })
          .returning<{ id: number }[]>("id");
        if (!inserted) throw new HttpError(500, "server_error", "The exclusion could not be stored. Try again.");
        await audit({ userId: actorId, action: "exclusion.add", targetType: "exclusion", targetId: inserted.id, details: { campaignId, ...input, ...auditDetails } });
        afterCommit(() => core.samples.invalidate(campaignId));
        return inserted.id;
      });
      const row = await exclusionRows(core.knex).where("exclusion.id", id).first();
      if (!row) throw notFound("That exclusion");
      return exclusionView(row);
    },

    /** Removes a window of the campaign; 404 when the campaign has no such window. */
    remove(actorId: string, campaignId: number, exclusionId: number): Promise<void> {
      return core.write(async ({ trx, audit, afterCommit }) => {
        const row = await trx("exclusion")
          .where({ id: exclusionId, campaign_id: campaignId })
          .first<{ id: number; from_ms: number; to_ms: number; reason: string } | undefined>();
        if (!row) throw notFound("That exclusion");
        await trx("exclusion").where({ id: row.id }).delete();
        await audit({
          userId: actorId,
          action: "exclusion.remove",
          targetType: "exclusion",
          targetId: row.id,
          details: { campaignId, from: new Date(row.from_ms).toISOString(), to: new Date(row.to_ms).toISOString(), reason: row.reason },
        });
        afterCommit(() => core.samples.invalidate(campaignId));
      });
    },
  };
}

export type ExclusionsStore = ReturnType<typeof exclusionsStore>;
