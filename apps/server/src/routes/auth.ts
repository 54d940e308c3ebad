import type { Request } from "express";
import { passwordProblems, resetRequestSchema, setPasswordSchema, signInSchema, type Me } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { startSession } from "../auth/lucia.server";
import { checkSignInPassword, hashPassword } from "../auth/passwords.server";
import { describeWait, SignInGuard } from "../auth/sign-in-guard.server";
import { HttpError, parseOr400 } from "../http/errors";
import { ApiRouter } from "../http/route-table";
import { currentUser } from "../http/session";

/** The client's address (behind a proxy on this machine, the one it forwarded: app.ts trusts loopback proxies). */
const addressOf = (req: Request) => req.ip ?? req.socket.remoteAddress ?? "unknown";

const BAD_CREDENTIALS = "That e-mail and password do not match an account. Check both and try again.";

/** /api/auth: sign-in and sign-out. */
export function authRoutes({ store, lucia, signInGuard }: AppContext): ApiRouter {
  const routes = new ApiRouter("/auth");
  // Sign-in and sign-out write sessions through Lucia, outside the store, and never wait for a running ingest:
  // a session write that meets the write lock is kept in memory and lands through the write gate (SessionAdapter).
  // Their audit rows are written the same way: started, not waited for (signInGuard.track).

  routes.route("POST", "/sign-in", { access: "public" }, async (req, res) => {
    const input = parseOr400(signInSchema, req.body, "The sign-in form");
    const address = addressOf(req);
    const waitMs = signInGuard.waitMs(input.email, address);
    if (waitMs > 0) {
      const account = await store.users.credentials(input.email);
      signInGuard.track(() => store.users.recordSignInFailure({ email: input.email, address, reason: "rate_limited", accountId: account?.id ?? null }));
      res.setHeader("Retry-After", String(Math.ceil(waitMs / 1000)));
      throw new HttpError(
        429,
        "too_many_attempts",
        `Too many failed sign-ins for this account or from this network. Wait ${describeWait(waitMs)}, then try again. If you have forgotten your password, ask for a new one.`,
      );
    }
    const account = await store.users.credentials(input.email);
    // Same answer for an unknown e-mail and a wrong password, so accounts cannot be probed. Unknown e-mails (and
    // invited accounts, which have no password yet) are checked against a dummy hash, so both take the same time.
    const valid = await checkSignInPassword(account && account.status !== "invited" ? account.passwordHash : undefined, input.password);
    if (!account || !valid) {
      signInGuard.failed(input.email, address);
      signInGuard.track(() => store.users.recordSignInFailure({ email: input.email, address, reason: "bad_credentials", accountId: account?.id ?? null }));
      throw new HttpError(401, "bad_credentials", BAD_CREDENTIALS);
    }
    if (account.status === "deactivated") {
      // Only someone who knows the password learns that the account exists and is deactivated.
      signInGuard.track(() => store.users.recordSignInFailure({ email: input.email, address, reason: "deactivated", accountId: account.id }));
      throw new HttpError(403, "account_deactivated", "This account has been deactivated. Ask an administrator if you need access again.");
    }
    signInGuard.succeeded(input.email);
    const { token, session } = await startSession(lucia, account.id);
    res.append("Set-Cookie", lucia.createSessionCookie(token).serialize());
    const { user } = await lucia.validateSession(session.id);
    if (!user) throw new HttpError(500, "server_error", "The session could not be created. Try again.");
    signInGuard.track(() => store.users.recordSignIn(account.id, address));
    const me: Me = { id: user.id, email: user.email, name: user.name, role: user.role };
    res.json(me);
  });

  routes.route("POST", "/sign-out", { access: "public" }, async (_req, res) => {
    if (res.locals.session) await lucia.invalidateSession(res.locals.session.id);
    res.append("Set-Cookie", lucia.createBlankSessionCookie().serialize());
    res.json({ ok: true });
  });

  // Password reset by e-mail: the same answer, at once, whether or not an account has the address; the link (for
  // an active account only) is made and queued in the background, so the time taken tells nothing either.
  // At most 3 reset e-mails per address typed and 10 per client within 15 minutes, so the form cannot be used to
  // flood someone's mailbox; beyond that the answer stays the same and nothing is sent.
  const resetLimit = new SignInGuard({ maxFailuresPerAccount: 3, maxFailuresPerAddress: 10, windowMs: 15 * 60_000 });
  routes.route("POST", "/password-reset", { access: "public" }, async (req, res) => {
    const input = parseOr400(resetRequestSchema, req.body, "The password reset form");
    const address = addressOf(req);
    if (resetLimit.waitMs(input.email, address) === 0) {
      resetLimit.failed(input.email, address);
      signInGuard.track(() => store.accountLinks.requestReset(input.email));
    }
    res.status(202).json({ ok: true, message: `If ${input.email} belongs to an active Calmcrest account, a link to choose a new password is on its way. It works once, for 2 hours.` });
  });

  routes.route("GET", "/password-links/:token", { access: "public" }, async (req, res) => {
    res.json(await store.accountLinks.info(String(req.params.token)));
  });

  routes.route("POST", "/password-links/:token", { access: "public" }, async (req, res) => {
    const token = String(req.params.token);
    const input = parseOr400(setPasswordSchema, req.body, "The new password");
    const link = await store.accountLinks.info(token);
    const problems = passwordProblems(input.password, link);
    if (problems.length > 0) throw new HttpError(400, "invalid_input", `The new password has invalid fields. password: ${problems.join(" ")}`, { password: problems });
    // Hashing takes a while: done before the write takes the write gate.
    const { userId, purpose } = await store.accountLinks.use(token, await hashPassword(input.password));
    // After a reset, every session that was open with the old password ends.
    if (purpose === "reset") await lucia.invalidateUserSessions(userId);
    res.json({ ok: true, email: link.email });
  });

  routes.route("POST", "/sign-out-everywhere", { access: "signed-in" }, async (_req, res) => {
    const user = currentUser(res.locals);
    await lucia.invalidateUserSessions(user.id);
    await store.users.recordSignOutEverywhere(user.id, user.id);
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
