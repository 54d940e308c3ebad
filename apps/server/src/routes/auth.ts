import { signInSchema, type Me } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { verifyPassword } from "../auth/passwords.server";
import { HttpError, parseOr400 } from "../http/errors";
import { ApiRouter } from "../http/route-table";
import { currentUser } from "../http/session";
import { writeSlot } from "../ingest/ingest-queue.server";

/** /api/auth: sign-in and sign-out. */
export function authRoutes({ store, lucia, ingest }: AppContext): ApiRouter {
  const routes = new ApiRouter("/auth");
  // Sign-in and sign-out write sessions through Lucia, outside the store: they wait for a running ingest to
  // release SQLite's write lock (see WriteGate) instead of blocking the event loop on it.
  const sessionWrite = writeSlot(ingest);

  routes.route("POST", "/sign-in", { access: "public" }, sessionWrite, async (req, res) => {
    const input = parseOr400(signInSchema, req.body, "The sign-in form");
    const account = await store.users.credentials(input.email);
    // Same answer for an unknown e-mail and a wrong password, so accounts cannot be probed.
    const valid = account ? await verifyPassword(account.passwordHash, input.password) : false;
    if (!account || !valid) {
      throw new HttpError(401, "bad_credentials", "That e-mail and password do not match an account. Check both and try again.");
    }
    const session = await lucia.createSession(account.id, {});
    res.append("Set-Cookie", lucia.createSessionCookie(session.id).serialize());
    const { user } = await lucia.validateSession(session.id);
    if (!user) throw new HttpError(500, "server_error", "The session could not be created. Try again.");
    const me: Me = { id: user.id, email: user.email, name: user.name, role: user.role };
    res.json(me);
  });

  routes.route("POST", "/sign-out", { access: "public" }, sessionWrite, async (_req, res) => {
    if (res.locals.session) await lucia.invalidateSession(res.locals.session.id);
    res.append("Set-Cookie", lucia.createBlankSessionCookie().serialize());
    res.json({ ok: true });
  });

  return routes;
}

/** /api/me: who is signed in. */
export function meRoutes(_context: AppContext): ApiRouter {
  const routes = new ApiRouter("/me");
  routes.route("GET", "/", { access: "signed-in" }, (_req, res) => {
    const user = currentUser(res.locals);
    const me: Me = { id: user.id, email: user.email, name: user.name, role: user.role };
    res.json(me);
  });
  return routes;
}
