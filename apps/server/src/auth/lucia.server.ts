import { BetterSqlite3Adapter } from "@lucia-auth/adapter-sqlite";
import { Lucia, TimeSpan } from "lucia";
import type Database from "better-sqlite3";
import type { Role } from "@calmcrest/contracts";

export function createLucia(sqlite: Database.Database, { secureCookies }: { secureCookies: boolean }) {
  return new Lucia(new BetterSqlite3Adapter(sqlite, { user: "user", session: "session" }), {
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
    }),
  });
}

export type AppLucia = ReturnType<typeof createLucia>;

declare module "lucia" {
  interface Register {
    Lucia: AppLucia;
    DatabaseUserAttributes: { email: string; name: string; role: Role };
  }
}
