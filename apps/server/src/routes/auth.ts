import { Router } from "express";
import { signInSchema, type Me } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { verifyPassword } from "../auth/passwords.server";
import { HttpError, parseOr400 } from "../http/errors";
import { currentUser, requireUser } from "../http/session";
import { writeSlot } from "../ingest/ingest-queue.server";

export function authRoutes({ db, lucia, ingest }: AppContext): Router {
  const router = Router();
  // Sign-in and sign-out write sessions: wait for a running ingest to release SQLite's write lock (see writeSlot).
  router.use("/auth", writeSlot(ingest));

  router.post("/auth/sign-in", async (req, res) => {
    const input = parseOr400(signInSchema, req.body, "The sign-in form");
    const row = await db.knex("user").where({ email: input.email }).first<{ id: string; password_hash: string } | undefined>();
    // Same answer for an unknown e-mail and a wrong password, so accounts cannot be probed.
    const valid = row ? await verifyPassword(row.password_hash, input.password) : false;
    if (!row || !valid) {
      throw new HttpError(401, "bad_credentials", "That e-mail and password do not match an account. Check both and try again.");
    }
    const session = await lucia.createSession(row.id, {});
    res.append("Set-Cookie", lucia.createSessionCookie(session.id).serialize());
    const { user } = await lucia.validateSession(session.id);
    if (!user) throw new HttpError(500, "server_error", "The session could not be created. Try again.");
    const me: Me = { id: user.id, email: user.email, name: user.name, role: user.role };
    res.json(me);
  });

  router.post("/auth/sign-out", async (_req, res) => {
    if (res.locals.session) await lucia.invalidateSession(res.locals.session.id);
    res.append("Set-Cookie", lucia.createBlankSessionCookie().serialize());
    res.json({ ok: true });
  });

  router.get("/me", requireUser, (_req, res) => {
    const user = currentUser(res.locals);
    const me: Me = { id: user.id, email: user.email, name: user.name, role: user.role };
    res.json(me);
  });

  return router;
}
