import type { Knex } from "knex";
import type { CampaignMember } from "@calmcrest/contracts";
import { HttpError, notFound } from "../http/errors";
import type { StoreCore } from "./core";

// Campaign membership: who belongs to which campaign (engineers see only those), and its writes.

export async function isMember(knex: Knex, userId: string, campaignId: number): Promise<boolean> {
  const row = await knex("campaign_member").where({ user_id: userId, campaign_id: campaignId }).first();
  return row !== undefined;
}

interface MemberRow {
  user_id: string;
  name: string;
  email: string;
  role: string;
  added_at: string;
}

export function membershipsStore(core: StoreCore) {
  return {
    /** The campaign's members by name. */
    async list(campaignId: number): Promise<CampaignMember[]> {
      const rows = await core
        .knex("campaign_member")
        .join("user", "user.id", "campaign_member.user_id")
        .where("campaign_member.campaign_id", campaignId)
        .orderBy("user.name")
        .select<MemberRow[]>("campaign_member.user_id", "user.name", "user.email", "user.role", "campaign_member.added_at");
      return rows.map((member) => ({ userId: member.user_id, name: member.name, email: member.email, role: member.role, addedAt: member.added_at }));
    },

    /** Adds a member (400 for an unknown user); adding an existing member changes nothing and writes no audit row. */
    add(actorId: string | null, campaignId: number, userId: string, auditDetails: { demo?: boolean } = {}): Promise<void> {
      return core.write(
        async ({ trx, audit, afterCommit }) => {
          const member = await trx("user").where({ id: userId }).first<{ id: string } | undefined>();
          if (!member) {
            throw new HttpError(400, "invalid_input", "The new member has invalid fields. userId: no user has that id.", { userId: ["No user has that id."] });
          }
          if (await isMember(trx, member.id, campaignId)) return;
          await trx("campaign_member").insert({ campaign_id: campaignId, user_id: member.id, added_at: new Date().toISOString() });
          await audit({
            userId: actorId,
            action: "member.add",
            targetType: "member",
            targetId: `${campaignId}:${member.id}`,
            details: { campaignId, memberId: member.id, ...auditDetails },
          });
          // Which sites an engineer sees, and the briefs of their site list, depend on membership.
          afterCommit(() => core.samples.briefs.clear());
        },
        // Adding an existing member is a no-op with nothing to audit.
        { audited: false },
      );
    },

    /** Removes a member; 404 when that membership does not exist. */
    remove(actorId: string, campaignId: number, userId: string): Promise<void> {
      return core.write(async ({ trx, audit, afterCommit }) => {
        const removed = await trx("campaign_member").where({ campaign_id: campaignId, user_id: userId }).delete();
        if (removed === 0) throw notFound("That membership");
        await audit({ userId: actorId, action: "member.remove", targetType: "member", targetId: `${campaignId}:${userId}`, details: { campaignId, memberId: userId } });
        afterCommit(() => core.samples.briefs.clear());
      });
    },
  };
}

export type MembershipsStore = ReturnType<typeof membershipsStore>;
