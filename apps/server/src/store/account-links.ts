import { createHash, randomBytes, randomUUID } from "node:crypto";
import type { Knex } from "knex";
import { ROLE_LABELS, type InviteInput, type PasswordLinkInfo, type PasswordLinkPurpose } from "@calmcrest/contracts";
import { composeMail } from "../mail/compose";
import { HttpError, notFound } from "../http/errors";
import type { StoreCore } from "./core";
import { queueMail } from "./outbox";

// One-time password links: an invitation (the person chooses their first password) and a password reset. The
// link carries a random 256-bit token; the database keeps only its SHA-256, so a copy of the database holds no
// link anyone could use. A link works once and until it expires; the e-mail is queued in the same transaction.

export interface LinkLifetimes {
  invitationMs: number;
  resetMs: number;
}

interface TokenRow {
  id: number;
  user_id: string;
  purpose: PasswordLinkPurpose;
  expires_at: string;
  used_at: string | null;
  email: string;
  name: string;
  status: string;
}

const hashToken = (token: string) => createHash("sha256").update(token).digest("hex");

/** The refusal for a link that cannot be used, in words that say what to do next. */
function linkRefusal(row: TokenRow | undefined, nowMs: number): HttpError | null {
  if (!row) {
    return new HttpError(404, "link_unknown", "This link is not valid. Check that the whole address from the e-mail was opened, or ask an administrator for a new link.");
  }
  const what = row.purpose === "invite" ? "invitation" : "password reset link";
  if (row.used_at !== null) {
    return new HttpError(
      410,
      "link_used",
      `This ${what} has been used already; each link works once. ${row.purpose === "invite" ? "Sign in with the password you chose, or ask for a password reset." : "Sign in with your new password, or ask for another reset."}`,
    );
  }
  if (Date.parse(row.expires_at) <= nowMs) {
    return new HttpError(
      410,
      "link_expired",
      `This ${what} expired on ${row.expires_at.slice(0, 16).replace("T", " ")} UTC. ${row.purpose === "invite" ? "Ask an administrator to send a new invitation." : "Ask for a new password reset link from the sign-in page."}`,
    );
  }
  if (row.status === "deactivated") {
    return new HttpError(403, "account_deactivated", "This account has been deactivated, so its password cannot be set. Ask an administrator if you need access again.");
  }
  return null;
}

export function accountLinksStore(core: StoreCore, lifetimes: LinkLifetimes) {
  const linkUrl = (token: string) => `${core.publicBaseUrl}/set-password?token=${token}`;

  async function tokenRow(knex: Knex | Knex.Transaction, token: string): Promise<TokenRow | undefined> {
    return knex("account_token")
      .join("user", "user.id", "account_token.user_id")
      .where("account_token.token_hash", hashToken(token))
      .first<TokenRow | undefined>("account_token.id", "account_token.user_id", "account_token.purpose", "account_token.expires_at", "account_token.used_at", "user.email", "user.name", "user.status");
  }

  /** Retires the person's open links and stores a new one; returns the token for the e-mail. */
  async function newLink(trx: Knex.Transaction, userId: string, purpose: PasswordLinkPurpose): Promise<{ token: string; expiresAt: string }> {
    const now = new Date();
    await trx("account_token").where({ user_id: userId }).whereNull("used_at").update({ used_at: now.toISOString() });
    const token = randomBytes(32).toString("base64url");
    const expiresAt = new Date(now.getTime() + (purpose === "invite" ? lifetimes.invitationMs : lifetimes.resetMs)).toISOString();
    await trx("account_token").insert({ user_id: userId, purpose, token_hash: hashToken(token), created_at: now.toISOString(), expires_at: expiresAt });
    return { token, expiresAt };
  }

  const expiryWords = (expiresAt: string) => `${expiresAt.slice(0, 16).replace("T", " ")} UTC`;

  async function queueInvitation(trx: Knex.Transaction, person: { id: string; email: string; name: string; role: InviteInput["role"] }, inviter: string, link: { token: string; expiresAt: string }) {
    const parts = composeMail({
      heading: `${inviter} invites you to Calmcrest`,
      paragraphs: [
        `Hello ${person.name}, you have a Calmcrest account as ${ROLE_LABELS[person.role]}, with the e-mail address ${person.email}.`,
        `Open the link below to choose your password. It works once, until ${expiryWords(link.expiresAt)}.`,
      ],
      links: [{ label: "Choose your password", url: linkUrl(link.token) }],
      footer: "You get this because an administrator of Calmcrest invited you. If you did not expect it, ignore it: nothing happens without the link.",
    });
    await queueMail(trx, { kind: "invitation", to: person.email, toUserId: person.id, subject: "Your Calmcrest invitation", ...parts });
  }

  async function queueReset(trx: Knex.Transaction, person: { id: string; email: string; name: string }, link: { token: string; expiresAt: string }) {
    const parts = composeMail({
      heading: "Choose a new Calmcrest password",
      paragraphs: [`Hello ${person.name}, someone asked to reset the password of the Calmcrest account ${person.email}.`, `The link below works once, until ${expiryWords(link.expiresAt)}. Your current password keeps working until you choose a new one.`],
      links: [{ label: "Choose a new password", url: linkUrl(link.token) }],
      footer: "If you did not ask for this, ignore this message: your password stays as it is.",
    });
    await queueMail(trx, { kind: "password_reset", to: person.email, toUserId: person.id, subject: "Reset your Calmcrest password", ...parts });
  }

  return {
    /**
     * Invites a person: an account without a password (status invited), their campaigns (engineers), a one-time
     * link and its e-mail, all in one transaction. 409 when the e-mail has an account; 400 for an unknown campaign.
     */
    invite(actorId: string, input: InviteInput): Promise<string> {
      return core.write(async ({ trx, audit, afterCommit }) => {
        if (await trx("user").where({ email: input.email }).first()) {
          throw new HttpError(409, "email_taken", "An account with that e-mail address exists already. Open that person to send them a new link.", { email: ["An account with that e-mail address exists already."] });
        }
        const campaignIds = input.role === "engineer" ? [...new Set(input.campaignIds)] : [];
        if (campaignIds.length > 0) {
          const found = await trx("campaign").whereIn("id", campaignIds).select<{ id: number }[]>("id");
          if (found.length !== campaignIds.length) {
            throw new HttpError(400, "invalid_input", "The invitation has invalid fields. campaignIds: one of the campaigns does not exist any more; reload the page and choose again.", { campaignIds: ["One of the campaigns does not exist."] });
          }
        }
        const id = randomUUID();
        // No password yet: an empty hash never verifies, and sign-in treats invited accounts as unknown.
        await trx("user").insert({ id, email: input.email, name: input.name, role: input.role, password_hash: "", status: "invited" });
        const addedAt = new Date().toISOString();
        for (const campaignId of campaignIds) await trx("campaign_member").insert({ campaign_id: campaignId, user_id: id, added_at: addedAt });
        const link = await newLink(trx, id, "invite");
        await audit({ userId: actorId, action: "user.invite", targetType: "user", targetId: id, details: { email: input.email, name: input.name, role: input.role, campaignIds, expiresAt: link.expiresAt } });
        const inviter = await trx("user").where({ id: actorId }).first<{ name: string } | undefined>("name");
        await queueInvitation(trx, { id, email: input.email, name: input.name, role: input.role }, inviter?.name ?? "An administrator", link);
        // Which sites an engineer sees depends on membership.
        if (campaignIds.length > 0) afterCommit(() => core.samples.briefs.clear());
        return id;
      });
    },

    /**
     * Sends a person a new link (retiring their open ones): a new invitation while they have no password yet,
     * otherwise a password reset. Refused for a deactivated account.
     */
    sendLink(actorId: string, userId: string): Promise<{ purpose: PasswordLinkPurpose; expiresAt: string }> {
      return core.write(async ({ trx, audit }) => {
        const person = await trx("user").where({ id: userId }).first<{ id: string; email: string; name: string; role: InviteInput["role"]; status: string } | undefined>("id", "email", "name", "role", "status");
        if (!person) throw notFound("That person");
        if (person.status === "deactivated") throw new HttpError(409, "account_deactivated", `${person.name}'s account is deactivated. Reactivate it first.`);
        const purpose: PasswordLinkPurpose = person.status === "invited" ? "invite" : "reset";
        const link = await newLink(trx, person.id, purpose);
        if (purpose === "invite") {
          const inviter = await trx("user").where({ id: actorId }).first<{ name: string } | undefined>("name");
          await audit({ userId: actorId, action: "user.invite", targetType: "user", targetId: person.id, details: { email: person.email, name: person.name, role: person.role, campaignIds: [], expiresAt: link.expiresAt } });
          await queueInvitation(trx, person, inviter?.name ?? "An administrator", link);
        } else {
          await audit({ userId: actorId, action: "auth.password_reset_requested", targetType: "user", targetId: person.id, details: { by: "admin", expiresAt: link.expiresAt } });
          await queueReset(trx, person, link);
        }
        return { purpose, expiresAt: link.expiresAt };
      });
    },

    /** A reset asked for on the sign-in page: a link for an active account with that e-mail; nothing otherwise. */
    async requestReset(email: string): Promise<void> {
      const person = await core.knex("user").where({ email, status: "active" }).first<{ id: string; email: string; name: string } | undefined>("id", "email", "name");
      if (!person) return;
      await core.write(async ({ trx, audit }) => {
        const link = await newLink(trx, person.id, "reset");
        await audit({ userId: null, action: "auth.password_reset_requested", targetType: "user", targetId: person.id, details: { by: "self", expiresAt: link.expiresAt } });
        await queueReset(trx, person, link);
      });
    },

    /** What a link is for, or the refusal (404 unknown, 410 used or expired, 403 deactivated). */
    async info(token: string): Promise<PasswordLinkInfo> {
      const row = await tokenRow(core.knex, token);
      const refusal = linkRefusal(row, Date.now());
      if (refusal || !row) throw refusal ?? notFound("That link");
      return { purpose: row.purpose, email: row.email, name: row.name, expiresAt: row.expires_at };
    },

    /**
     * Uses a link: sets the password (already hashed and checked against the rules), activates an invited account,
     * marks the link used. Checked again inside the transaction, so two uses at once cannot both succeed.
     */
    use(token: string, passwordHash: string): Promise<{ userId: string; purpose: PasswordLinkPurpose }> {
      return core.write(async ({ trx, audit }) => {
        const row = await tokenRow(trx, token);
        const refusal = linkRefusal(row, Date.now());
        if (refusal || !row) throw refusal ?? notFound("That link");
        const usedAt = new Date().toISOString();
        const marked = await trx("account_token").where({ id: row.id }).whereNull("used_at").update({ used_at: usedAt });
        if (marked === 0) throw new HttpError(410, "link_used", "This link has been used already; each link works once.");
        await trx("user").where({ id: row.user_id }).update({ password_hash: passwordHash, ...(row.status === "invited" ? { status: "active" } : {}) });
        await audit({ userId: row.user_id, action: "auth.password_set", targetType: "user", targetId: row.user_id, details: { via: row.purpose === "invite" ? "invitation" : "reset" } });
        return { userId: row.user_id, purpose: row.purpose };
      });
    },
  };
}

export type AccountLinksStore = ReturnType<typeof accountLinksStore>;
