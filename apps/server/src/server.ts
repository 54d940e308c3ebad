import type { Server } from "node:http";
import { createApp } from "./app";
import { createLucia } from "./auth/lucia.server";
import type { AppContext } from "./context";
import { openDatabase } from "./db/database.server";
import type { Env } from "./env.server";
import { seedIfEmpty } from "./seed/index";

// Start-up hooks other areas register (for example: mark uploads left half-done by a dead process).
export const startupSteps: ((context: AppContext) => Promise<void>)[] = [];

/** Opens the database (migrating it), seeds an empty one, and returns the context the app runs on. */
export async function createContext(env: Env): Promise<AppContext> {
  const db = await openDatabase(env.dataDir);
  const lucia = createLucia(db.sqlite, { secureCookies: env.NODE_ENV === "production" });
  const context: AppContext = { env, db, lucia };
  for (const step of startupSteps) await step(context);
  await seedIfEmpty(context);
  return context;
}

export function listen(context: AppContext): Promise<Server> {
  const app = createApp(context);
  return new Promise((resolve, reject) => {
    const server = app.listen(context.env.PORT, context.env.HOST, () => resolve(server));
    server.on("error", reject);
  });
}
