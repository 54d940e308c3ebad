import type { RequestHandler } from "express";
import { verifyRequestOrigin, type Session, type User } from "lucia";
import type { Role } from "@calmcrest/contracts";
import type { AppLucia } from "../auth/lucia.server";
import { HttpError } from "./errors";

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Locals {
      user: User | null;
      session: Session | null;
    }
  }
}

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * Rejects state-changing requests whose Origin is not this server (cross-site request forgery guard).
 * Browsers send Origin on every POST/PATCH/DELETE made by fetch, so a missing header is rejected too.
 */
export const originCheck: RequestHandler = (req, _res, next) => {
  if (SAFE_METHODS.has(req.method)) return next();
  const origin = req.headers.origin;
  const host = req.headers.host;
  if (!origin || !host || !verifyRequestOrigin(origin, [host])) {
    return next(
      new HttpError(
        403,
        "bad_origin",
        "This request did not come from a Calmcrest page on this server (its Origin header is missing or belongs to another site). Reload Calmcrest and try again.",
      ),
    );
  }
  next();
};

/** Reads the session cookie, validates it, refreshes it when Lucia says so, and puts user/session in res.locals. */
export function loadSession(lucia: AppLucia): RequestHandler {
  return async (req, res, next) => {
    res.locals.user = null;
    res.locals.session = null;
    const sessionId = lucia.readSessionCookie(req.headers.cookie ?? "");
    if (!sessionId) return next();
    try {
      const { session, user } = await lucia.validateSession(sessionId);
      if (session?.fresh) res.append("Set-Cookie", lucia.createSessionCookie(session.id).serialize());
      if (!session) res.append("Set-Cookie", lucia.createBlankSessionCookie().serialize());
      res.locals.user = user;
      res.locals.session = session;
      next();
    } catch (error) {
      next(error);
    }
  };
}

export const requireUser: RequestHandler = (_req, res, next) => {
  if (!res.locals.user) {
    return next(new HttpError(401, "signed_out", "You are not signed in, or your session has expired. Sign in again."));
  }
  next();
};

/** 403 for a signed-in user whose role may not use this route. Use after requireUser. */
export function requireRole(...roles: Role[]): RequestHandler {
  return (_req, res, next) => {
    const user = res.locals.user;
    if (!user) return next(new HttpError(401, "signed_out", "You are not signed in, or your session has expired. Sign in again."));
    if (!roles.includes(user.role)) {
      return next(new HttpError(403, "forbidden", `Your role (${user.role}) cannot do this. Ask an administrator if you need access.`));
    }
    next();
  };
}

/** The signed-in user; only call behind requireUser. */
export function currentUser(locals: Express.Locals): User {
  if (!locals.user) throw new HttpError(401, "signed_out", "You are not signed in, or your session has expired. Sign in again.");
  return locals.user;
}
