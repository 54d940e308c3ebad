import type { AppDatabase } from "./db/database.server";
import type { AppLucia } from "./auth/lucia.server";
import type { Env } from "./env.server";

/** What every route module receives. */
export interface AppContext {
  env: Env;
  db: AppDatabase;
  lucia: AppLucia;
}
