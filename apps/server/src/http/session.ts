import type { RequestHandler } from "express";
import type { Session, User } from "lucia";
import type { Role } from "@calmcrest/contracts";
import { sessionIdOf, type AppLucia } from "../auth/lucia.server";
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

/** The origin (scheme://host:port, lower case, default port dropped) of an Origin header, or null if it is not one. */
function originOf(header: string): string | null {
  try {
    const url = new URL(header);
    return url.protocol === "http:" || url.protocol === "https:" ? url.origin : null;
  } catch {
    return null;
  }
}

/**
 * Rejects state-changing requests whose Origin is not the configured public origin of Calmcrest (cross-site request
 * forgery guard). Scheme, host and port are compared with CALMCREST_PUBLIC_URL (or the local address), never with
 * the request's own Host header, which the sender chooses. Browsers send Origin on every POST/PATCH/DELETE made by
 * fetch, so a missing header is rejected too.
 */
export function originCheck(allowedOrigins: readonly string[]): RequestHandler {
  const allowed = new Set(allowedOrigins.map((origin) => originOf(origin) ?? origin));
  return (req, _res, next) => {
    if (SAFE_METHODS.has(req.method)) return next();
    const header = req.headers.origin;
    const origin = header ? originOf(header) : null;
    if (!origin || !allowed.has(origin)) {
      return next(
        new HttpError(
          403,
          "bad_origin",
          "This request did not come from a Calmcrest page on this server (its Origin header is missing or belongs to another site). Reload Calmcrest and try again. Administrators: CALMCREST_PUBLIC_URL must be the address people open Calmcrest at.",
        ),
      );
    }
    next();
  };
}

/**
 * Reads the session cookie (a token), validates the session stored under the token's hash, refreshes it when
 * Lucia says so (never waiting for SQLite's write lock: see SessionAdapter), and puts user/session in res.locals.
 */
export function loadSession(lucia: AppLucia): RequestHandler {
  return async (req, res, next) => {
    res.locals.user = null;
    res.locals.session = null;
    const token = lucia.readSessionCookie(req.headers.cookie ?? "");
    if (!token) return next();
    try {
      const validated = await lucia.validateSession(sessionIdOf(token));
      // A deactivated account's sessions are ended when it is deactivated; this check also covers a session write
      // still waiting for the write lock at that moment.
      const { session, user } = validated.user && validated.user.status !== "active" ? { session: null, user: null } : validated;
      if (session?.fresh) res.append("Set-Cookie", lucia.createSessionCookie(token).serialize());
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
