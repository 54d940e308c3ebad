import { createUserSchema, patchUserSchema } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { hashPassword } from "../auth/passwords.server";
import { parseOr400 } from "../http/errors";
import { ApiRouter } from "../http/route-table";
import { currentUser } from "../http/session";

/** /api/users: account management (administrators only). */
export function userRoutes(context: AppContext): ApiRouter {
  const { store } = context;
  const routes = new ApiRouter("/users");

  routes.route("GET", "/", { access: ["admin"] }, async (_req, res) => {
    res.json(await store.users.list());
  });

  routes.route("POST", "/", { access: ["admin"] }, async (req, res) => {
    const admin = currentUser(res.locals);
    const input = parseOr400(createUserSchema, req.body, "The new account");
    // Hashing takes a while: done before the write takes the write gate.
    const userId = await store.users.create(admin.id, input, await hashPassword(input.password));
    res.status(201).json(await store.users.listItem(userId));
  });

  routes.route("PATCH", "/:id", { access: ["admin"] }, async (req, res) => {
    const admin = currentUser(res.locals);
    const input = parseOr400(patchUserSchema, req.body, "The role change");
    const userId = String(req.params.id);
    await store.users.setRole(admin.id, userId, input.role);
    res.json(await store.users.listItem(userId));
  });

  return routes;
}
