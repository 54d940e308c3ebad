import { signInSchema, type Me } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { startSession } from "../auth/lucia.server";
import { checkSignInPassword } from "../auth/passwords.server";
import { HttpError, parseOr400 } from "../http/errors";
import { ApiRouter } from "../http/route-table";
import { currentUser } from "../http/session";

/** /api/auth: sign-in and sign-out. */
export function authRoutes({ store, lucia }: AppContext): ApiRouter {
  const routes = new ApiRouter("/auth");
  // Sign-in and sign-out write sessions through Lucia, outside the store, and never wait for a running ingest:
  // a session write that meets the write lock is kept in memory and lands through the write gate (SessionAdapter).

  routes.route("POST", "/sign-in", { access: "public" }, async (req, res) => {
    const input = parseOr400(signInSchema, req.body, "The sign-in form");
    const account = await store.users.credentials(input.email);
    // Same answer for an unknown e-mail and a wrong password, so accounts cannot be probed.
    // Unknown e-mails are checked against a dummy hash, so both answers take the same time too.
    const valid = await checkSignInPassword(account?.passwordHash, input.password);
    if (!account || !valid) {
      throw new HttpError(401, "bad_credentials", "That e-mail and password do not match an account. Check both and try again.");
    }
    const { token, session } = await startSession(lucia, account.id);
    res.append("Set-Cookie", lucia.createSessionCookie(token).serialize());
    const { user } = await lucia.validateSession(session.id);
    if (!user) throw new HttpError(500, "server_error", "The session could not be created. Try again.");
    const me: Me = { id: user.id, email: user.email, name: user.name, role: user.role };
    res.json(me);
  });

  routes.route("POST", "/sign-out", { access: "public" }, async (_req, res) => {
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
