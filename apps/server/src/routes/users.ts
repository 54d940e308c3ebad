import { changeEmailSchema, inviteSchema, patchUserSchema } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { parseOr400 } from "../http/errors";
import { ApiRouter } from "../http/route-table";
import { currentUser } from "../http/session";

/** /api/users: account management (administrators only). */
export function userRoutes(context: AppContext): ApiRouter {
  const { store, lucia } = context;
  const routes = new ApiRouter("/users");

  routes.route("GET", "/", { access: ["admin"] }, async (_req, res) => {
    res.json(await store.users.list());
  });

  // People join by invitation: an e-mail with a one-time link to choose their own password. (The first
  // administrator of an installation is made with `npm run create-admin`.)
  routes.route("POST", "/invitations", { access: ["admin"] }, async (req, res) => {
    const admin = currentUser(res.locals);
    const input = parseOr400(inviteSchema, req.body, "The invitation");
    const userId = await store.accountLinks.invite(admin.id, input);
    res.status(201).json(await store.users.listItem(userId));
  });

  /** A new invitation (no password yet) or a password reset link, by e-mail; earlier open links stop working. */
  routes.route("POST", "/:id/password-link", { access: ["admin"] }, async (req, res) => {
    const admin = currentUser(res.locals);
    res.json(await store.accountLinks.sendLink(admin.id, String(req.params.id)));
  });

  routes.route("GET", "/:id", { access: ["admin"] }, async (req, res) => {
    res.json(await store.users.detail(String(req.params.id)));
  });

  routes.route("PATCH", "/:id", { access: ["admin"] }, async (req, res) => {
    const admin = currentUser(res.locals);
    const input = parseOr400(patchUserSchema, req.body, "The role change");
    const userId = String(req.params.id);
    await store.users.setRole(admin.id, userId, input.role, { undo: input.undo });
    res.json(await store.users.listItem(userId));
  });

  routes.route("POST", "/:id/email", { access: ["admin"] }, async (req, res) => {
    const admin = currentUser(res.locals);
    const input = parseOr400(changeEmailSchema, req.body, "The e-mail change");
    const userId = String(req.params.id);
    await store.users.changeEmail(admin.id, userId, input.email);
    res.json(await store.users.listItem(userId));
  });

  routes.route("POST", "/:id/deactivate", { access: ["admin"] }, async (req, res) => {
    const admin = currentUser(res.locals);
    const userId = String(req.params.id);
    await store.users.setActive(admin.id, userId, false);
    // Every session ends at once (a session write waiting for the lock is covered by the status check in loadSession).
    await lucia.invalidateUserSessions(userId);
    res.json(await store.users.listItem(userId));
  });

  routes.route("POST", "/:id/reactivate", { access: ["admin"] }, async (req, res) => {
    const admin = currentUser(res.locals);
    const userId = String(req.params.id);
    await store.users.setActive(admin.id, userId, true);
    res.json(await store.users.listItem(userId));
  });

  routes.route("POST", "/:id/sign-out-everywhere", { access: ["admin"] }, async (req, res) => {
    const admin = currentUser(res.locals);
    const userId = String(req.params.id);
    await store.users.recordSignOutEverywhere(admin.id, userId);
    await lucia.invalidateUserSessions(userId);
    res.json(await store.users.listItem(userId));
  });

  return routes;
}
