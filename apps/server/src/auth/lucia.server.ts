import { createHash } from "node:crypto";
import { generateIdFromEntropySize, Lucia, TimeSpan, type Session } from "lucia";
import type { AccountStatus, Role } from "@calmcrest/contracts";
import type { SessionAdapter } from "./session-adapter.server";

export function createLucia(adapter: SessionAdapter, { secureCookies }: { secureCookies: boolean }) {
  return new Lucia(adapter, {
    sessionExpiresIn: new TimeSpan(14, "d"),
    sessionCookie: {
      name: "calmcrest_session",
      // Lucia sets HttpOnly and SameSite=Lax itself; Secure only where the site is served over https.
      attributes: { secure: secureCookies, sameSite: "lax" },
    },
    getUserAttributes: (attributes) => ({
      email: attributes.email,
      name: attributes.name,
      role: attributes.role,
      status: attributes.status,
    }),
  });
}

export type AppLucia = ReturnType<typeof createLucia>;

/**
 * The session id stored in the database for a cookie's token: its SHA-256 (hex). The cookie holds the token, the
 * database only its hash, so a copy of the database holds no session anyone could use (the scheme Lucia's
 * authors recommend for v3 and later).
 */
export function sessionIdOf(token: string): string {
  return createHash("sha256").update(token).digest("hex");
}

/** Starts a session: a random token (200 bits, base32) for the cookie, its hash as the stored id. */
export async function startSession(lucia: AppLucia, userId: string): Promise<{ token: string; session: Session }> {
  const token = generateIdFromEntropySize(25);
  const session = await lucia.createSession(userId, {}, { sessionId: sessionIdOf(token) });
  return { token, session };
}

declare module "lucia" {
  interface Register {
    Lucia: AppLucia;
    DatabaseUserAttributes: { email: string; name: string; role: Role; status: AccountStatus };
  }
}
