import { randomUUID } from "node:crypto";
import { Router } from "express";
import { createUserSchema, patchUserSchema, type UserListItem } from "@calmcrest/contracts";
import type { Role } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { hashPassword } from "../auth/passwords.server";
import { recordAudit } from "../audit/audit.server";
import { HttpError, notFound, parseOr400 } from "../http/errors";
import { currentUser, requireRole, requireUser } from "../http/session";
import { writeSlot } from "../ingest/ingest-queue.server";

interface UserRow {
  id: string;
  email: string;
  name: string;
  role: Role;
  created_at: string;
}

export function userRoutes(context: AppContext): Router {
  const { db } = context;
  const knex = db.knex;
  const router = Router();
  router.use("/users", requireUser, requireRole("admin"), writeSlot(context.ingest));

  async function listItems(where?: { id: string }): Promise<UserListItem[]> {
    const query = knex("user").orderBy("name").select<UserRow[]>("id", "email", "name", "role", "created_at");
    if (where) void query.where(where);
    const users = await query;
    const memberships = await knex("campaign_member")
      .join("campaign", "campaign.id", "campaign_member.campaign_id")
      .join("site", "site.id", "campaign.site_id")
      .orderBy("campaign.id")
      .select<{ user_id: string; id: number; name: string; site_name: string }[]>("campaign_member.user_id", "campaign.id", "campaign.name", "site.name as site_name");
    return users.map((user) => ({
      id: user.id,
      email: user.email,
      name: user.name,
      role: user.role,
      // SQLite's CURRENT_TIMESTAMP has no zone; it is UTC.
      createdAt: user.created_at.includes("T") ? user.created_at : `${user.created_at.replace(" ", "T")}Z`,
      campaigns: memberships.filter((row) => row.user_id === user.id).map((row) => ({ id: row.id, name: row.name, siteName: row.site_name })),
    }));
  }

  router.get("/users", async (_req, res) => {
    res.json(await listItems());
  });

  router.post("/users", async (req, res) => {
    const admin = currentUser(res.locals);
    const input = parseOr400(createUserSchema, req.body, "The new account");
    const existing = await knex("user").where({ email: input.email }).first();
    if (existing) {
      throw new HttpError(409, "email_taken", "An account with that e-mail address exists already.", { email: ["An account with that e-mail address exists already."] });
    }
    const id = randomUUID();
    await knex("user").insert({ id, email: input.email, name: input.name, role: input.role, password_hash: await hashPassword(input.password) });
    await recordAudit(knex, { userId: admin.id, action: "user.create", targetType: "user", targetId: id, details: { email: input.email, name: input.name, role: input.role } });
    const [created] = await listItems({ id });
    res.status(201).json(created);
  });

  router.patch("/users/:id", async (req, res) => {
    const admin = currentUser(res.locals);
    const input = parseOr400(patchUserSchema, req.body, "The role change");
    const user = await knex("user").where({ id: req.params.id }).first<UserRow | undefined>();
    if (!user) throw notFound("That user");
    if (user.id === admin.id && input.role !== "admin") {
      // Otherwise the last administrator could lock everyone out of account management.
      throw new HttpError(409, "own_role", "You cannot remove your own administrator role. Ask another administrator to do it.");
    }
    await knex("user").where({ id: user.id }).update({ role: input.role });
    await recordAudit(knex, { userId: admin.id, action: "user.role", targetType: "user", targetId: user.id, details: { from: user.role, to: input.role } });
    const [updated] = await listItems({ id: user.id });
    res.json(updated);
  });

  return router;
}
