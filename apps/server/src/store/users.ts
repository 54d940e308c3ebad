import { randomUUID } from "node:crypto";
import type { Knex } from "knex";
import type { AccountStatus, CreateUserInput, Role, UserDetail, UserListItem } from "@calmcrest/contracts";
import { HttpError, notFound } from "../http/errors";
import type { AuditStore } from "./audit";
import type { StoreCore } from "./core";

// Accounts: rows, the mapping to the contracts, and account writes (each with its audit row). Accounts are never
// deleted: a person who leaves is deactivated, so the audit log and everything they wrote keep their author.

export interface UserRow {
  id: string;
  email: string;
  name: string;
  role: Role;
  status: AccountStatus;
  created_at: string;
  last_sign_in_at: string | null;
}

const USER_COLUMNS = ["id", "email", "name", "role", "status", "created_at", "last_sign_in_at"] as const;

/** SQLite's CURRENT_TIMESTAMP has no zone; it is UTC. */
function isoUtc(sqliteTimestamp: string): string {
  return sqliteTimestamp.includes("T") ? sqliteTimestamp : `${sqliteTimestamp.replace(" ", "T")}Z`;
}

const emailTaken = () => new HttpError(409, "email_taken", "An account with that e-mail address exists already.", { email: ["An account with that e-mail address exists already."] });

/**
 * 409 when the change would leave Calmcrest without an active administrator: `userId` is an active administrator
 * and no other active administrator exists. Run inside the write's transaction, so two changes cannot both pass.
 */
async function refuseLastAdmin(trx: Knex.Transaction, user: UserRow, what: string): Promise<void> {
  if (user.role !== "admin" || user.status !== "active") return;
  const other = await trx("user").where({ role: "admin", status: "active" }).whereNot({ id: user.id }).first("id");
  if (!other) {
    throw new HttpError(
      409,
      "last_admin",
      `${user.name} is the last active administrator, so they cannot be ${what}: nobody could manage accounts any more. Make another person an administrator first.`,
    );
  }
}

export function usersStore(core: StoreCore, auditLog: AuditStore) {
  const knex = () => core.knex;

  async function listItems(where?: { id: string }): Promise<UserListItem[]> {
    const query = knex()("user").orderBy("name").select<UserRow[]>(...USER_COLUMNS);
    if (where) void query.where(where);
    const users = await query;
    const memberships = await knex()("campaign_member")
      .join("campaign", "campaign.id", "campaign_member.campaign_id")
      .join("site", "site.id", "campaign.site_id")
      .orderBy("campaign.id")
      .select<{ user_id: string; id: number; name: string; site_name: string }[]>("campaign_member.user_id", "campaign.id", "campaign.name", "site.name as site_name");
    return users.map((user) => ({
      id: user.id,
      email: user.email,
      name: user.name,
      role: user.role,
      status: user.status,
      createdAt: isoUtc(user.created_at),
      lastSignInAt: user.last_sign_in_at,
      campaigns: memberships.filter((row) => row.user_id === user.id).map((row) => ({ id: row.id, name: row.name, siteName: row.site_name })),
    }));
  }

  async function rowFor(trx: Knex.Transaction, userId: string): Promise<UserRow> {
    const user = await trx("user").where({ id: userId }).first<UserRow | undefined>(...USER_COLUMNS);
    if (!user) throw notFound("That person");
    return user;
  }

  async function isLastActiveAdmin(userId: string): Promise<boolean> {
    const user = await knex()("user").where({ id: userId }).first<UserRow | undefined>(...USER_COLUMNS);
    if (!user || user.role !== "admin" || user.status !== "active") return false;
    const other = await knex()("user").where({ role: "admin", status: "active" }).whereNot({ id: userId }).first("id");
    return !other;
  }

  return {
    list: () => listItems(),

    async listItem(userId: string): Promise<UserListItem> {
      const [item] = await listItems({ id: userId });
      if (!item) throw notFound("That person");
      return item;
    },

    /** One person's page: the account, their campaigns, last sign-in and latest actions. */
    async detail(userId: string): Promise<UserDetail> {
      const [item] = await listItems({ id: userId });
      if (!item) throw notFound("That person");
      const recent = await auditLog.page({ userId, page: 1, pageSize: 20 });
      return { ...item, recentActions: recent.rows, lastActiveAdmin: await isLastActiveAdmin(userId) };
    },

    async byId(userId: string): Promise<UserRow | undefined> {
      return knex()("user").where({ id: userId }).first<UserRow | undefined>(...USER_COLUMNS);
    },

    /** The user id of an e-mail address, or undefined. */
    async idByEmail(email: string): Promise<string | undefined> {
      const row = await knex()("user").where({ email }).first<{ id: string } | undefined>("id");
      return row?.id;
    },

    /** What sign-in checks a password against (an invited account has no usable password yet). */
    async credentials(email: string): Promise<{ id: string; passwordHash: string; status: AccountStatus } | undefined> {
      const row = await knex()("user").where({ email }).first<{ id: string; password_hash: string; status: AccountStatus } | undefined>("id", "password_hash", "status");
      return row ? { id: row.id, passwordHash: row.password_hash, status: row.status } : undefined;
    },

    async count(): Promise<number> {
      const row = await knex()("user").count<{ count: number }[]>({ count: "*" }).first();
      return Number(row?.count ?? 0);
    },

    /**
     * Creates an account from an already hashed password (hashing is slow: it is done before the write takes the
     * write gate). 409 when the e-mail is taken. `actorId` null: created by the system (the demo seed, create-admin).
     */
    create(actorId: string | null, input: Omit<CreateUserInput, "password">, passwordHash: string, auditDetails: { demo?: boolean; via?: "command_line" } = {}): Promise<string> {
      return core.write(async ({ trx, audit }) => {
        const existing = await trx("user").where({ email: input.email }).first();
        if (existing) throw emailTaken();
        const id = randomUUID();
        await trx("user").insert({ id, email: input.email, name: input.name, role: input.role, password_hash: passwordHash, status: "active" });
        await audit({ userId: actorId, action: "user.create", targetType: "user", targetId: id, details: { email: input.email, name: input.name, role: input.role, ...auditDetails } });
        return id;
      });
    },

    /**
     * Changes a role (an administrator's own too). The last active administrator cannot be given another role
     * (409 last_admin), so Calmcrest always keeps someone who can manage accounts.
     */
    setRole(actorId: string, userId: string, role: Role, options: { undo?: boolean } = {}): Promise<void> {
      return core.write(async ({ trx, audit }) => {
        const user = await rowFor(trx, userId);
        if (user.role === role) {
          throw new HttpError(409, "unchanged", `${user.name} already has that role; nothing was changed.`);
        }
        if (role !== "admin") await refuseLastAdmin(trx, user, "given another role");
        await trx("user").where({ id: user.id }).update({ role });
        await audit({ userId: actorId, action: "user.role", targetType: "user", targetId: user.id, details: options.undo ? { from: user.role, to: role, undo: true } : { from: user.role, to: role } });
      });
    },

    /** Changes a person's e-mail address (409 when another account has it). */
    changeEmail(actorId: string, userId: string, email: string): Promise<void> {
      return core.write(async ({ trx, audit }) => {
        const user = await rowFor(trx, userId);
        if (user.email === email) throw new HttpError(409, "unchanged", `${user.name}'s e-mail address is already ${email}; nothing was changed.`);
        if (await trx("user").where({ email }).whereNot({ id: user.id }).first()) throw emailTaken();
        await trx("user").where({ id: user.id }).update({ email });
        await audit({ userId: actorId, action: "user.email", targetType: "user", targetId: user.id, details: { from: user.email, to: email } });
      });
    },

    /**
     * Deactivates or reactivates an account. Nobody deactivates themselves, and the last active administrator
     * cannot be deactivated (409). Ending the sessions is the caller's next step (Lucia's store, outside this write).
     */
    setActive(actorId: string, userId: string, active: boolean): Promise<void> {
      return core.write(async ({ trx, audit }) => {
        const user = await rowFor(trx, userId);
        if (active) {
          if (user.status !== "deactivated") throw new HttpError(409, "not_deactivated", `${user.name}'s account is ${user.status}, not deactivated; nothing was changed.`);
          await trx("user").where({ id: user.id }).update({ status: "active" });
          await audit({ userId: actorId, action: "user.reactivate", targetType: "user", targetId: user.id, details: { email: user.email } });
          return;
        }
        if (user.status === "deactivated") throw new HttpError(409, "already_deactivated", `${user.name}'s account is already deactivated.`);
        if (user.id === actorId) throw new HttpError(409, "own_account", "You cannot deactivate your own account: another administrator must do it.");
        await refuseLastAdmin(trx, user, "deactivated");
        await trx("user").where({ id: user.id }).update({ status: "deactivated" });
        await audit({ userId: actorId, action: "user.deactivate", targetType: "user", targetId: user.id, details: { email: user.email } });
      });
    },

    /** Records a successful sign-in: the time on the account and a row in the audit log. */
    recordSignIn(userId: string, address: string): Promise<void> {
      return core.write(async ({ trx, audit }) => {
        await trx("user").where({ id: userId }).update({ last_sign_in_at: new Date().toISOString() });
        await audit({ userId, action: "auth.sign_in", targetType: "user", targetId: userId, details: { address } });
      });
    },

    /** Records a refused sign-in (the target is the account when one has that e-mail, else the e-mail typed). */
    recordSignInFailure(input: { email: string; address: string; reason: "bad_credentials" | "deactivated" | "rate_limited"; accountId: string | null }): Promise<void> {
      return core.write(async ({ audit }) => {
        await audit({
          userId: null,
          action: "auth.sign_in_failed",
          targetType: "user",
          targetId: input.accountId ?? input.email,
          details: { email: input.email, address: input.address, reason: input.reason, knownAccount: input.accountId !== null },
        });
      });
    },

    /** Records that every session of `userId` was ended (by them, or by an administrator). */
    recordSignOutEverywhere(actorId: string, userId: string): Promise<void> {
      return core.write(async ({ trx, audit }) => {
        await rowFor(trx, userId);
        await audit({ userId: actorId, action: "auth.sign_out_everywhere", targetType: "user", targetId: userId, details: { by: actorId === userId ? "self" : "admin" } });
      });
    },
  };
}

export type UsersStore = ReturnType<typeof usersStore>;
