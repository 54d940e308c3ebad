import { randomUUID } from "node:crypto";
import type { CreateUserInput, Role, UserListItem } from "@calmcrest/contracts";
import { HttpError, notFound } from "../http/errors";
import type { StoreCore } from "./core";

// Accounts: rows, the mapping to the contracts, and account writes (each with its audit row).

export interface UserRow {
  id: string;
  email: string;
  name: string;
  role: Role;
  created_at: string;
}

/** SQLite's CURRENT_TIMESTAMP has no zone; it is UTC. */
function isoUtc(sqliteTimestamp: string): string {
  return sqliteTimestamp.includes("T") ? sqliteTimestamp : `${sqliteTimestamp.replace(" ", "T")}Z`;
}

export function usersStore(core: StoreCore) {
  const knex = () => core.knex;

  async function listItems(where?: { id: string }): Promise<UserListItem[]> {
    const query = knex()("user").orderBy("name").select<UserRow[]>("id", "email", "name", "role", "created_at");
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
      createdAt: isoUtc(user.created_at),
      campaigns: memberships.filter((row) => row.user_id === user.id).map((row) => ({ id: row.id, name: row.name, siteName: row.site_name })),
    }));
  }

  return {
    list: () => listItems(),

    async listItem(userId: string): Promise<UserListItem> {
      const [item] = await listItems({ id: userId });
      if (!item) throw notFound("That user");
      return item;
    },

    async byId(userId: string): Promise<UserRow | undefined> {
      return knex()("user").where({ id: userId }).first<UserRow | undefined>("id", "email", "name", "role", "created_at");
    },

    /** The user id of an e-mail address, or undefined. */
    async idByEmail(email: string): Promise<string | undefined> {
      const row = await knex()("user").where({ email }).first<{ id: string } | undefined>("id");
      return row?.id;
    },

    /** What sign-in checks a password against. */
    async credentials(email: string): Promise<{ id: string; passwordHash: string } | undefined> {
      const row = await knex()("user").where({ email }).first<{ id: string; password_hash: string } | undefined>("id", "password_hash");
      return row ? { id: row.id, passwordHash: row.password_hash } : undefined;
    },

    async count(): Promise<number> {
      const row = await knex()("user").count<{ count: number }[]>({ count: "*" }).first();
      return Number(row?.count ?? 0);
    },

    /**
     * Creates an account from an already hashed password (hashing is slow: it is done before the write takes the
     * write gate). 409 when the e-mail is taken. `actorId` null: created by the system (the demo seed).
     */
    create(actorId: string | null, input: Omit<CreateUserInput, "password">, passwordHash: string, auditDetails: Record<string, unknown> = {}): Promise<string> {
      return core.write(async ({ trx, audit }) => {
        const existing = await trx("user").where({ email: input.email }).first();
        if (existing) {
          throw new HttpError(409, "email_taken", "An account with that e-mail address exists already.", { email: ["An account with that e-mail address exists already."] });
        }
        const id = randomUUID();
        await trx("user").insert({ id, email: input.email, name: input.name, role: input.role, password_hash: passwordHash });
        await audit({ userId: actorId, action: "user.create", targetType: "user", targetId: id, details: { email: input.email, name: input.name, role: input.role, ...auditDetails } });
        return id;
      });
    },

    /** Changes a role. An administrator cannot take their own administrator role (409), so the last one cannot lock everyone out. */
    setRole(actorId: string, userId: string, role: Role): Promise<void> {
      return core.write(async ({ trx, audit }) => {
        const user = await trx("user").where({ id: userId }).first<UserRow | undefined>();
        if (!user) throw notFound("That user");
        if (user.id === actorId && role !== "admin") {
          throw new HttpError(409, "own_role", "You cannot remove your own administrator role. Ask another administrator to do it.");
        }
        await trx("user").where({ id: user.id }).update({ role });
        await audit({ userId: actorId, action: "user.role", targetType: "user", targetId: user.id, details: { from: user.role, to: role } });
      });
    },
  };
}

export type UsersStore = ReturnType<typeof usersStore>;
