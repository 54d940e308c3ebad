import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import request from "supertest";
import type { Express } from "express";
import { afterAll } from "vitest";
import { createApp } from "./app";
import type { AppContext } from "./context";
import { parseEnv } from "./env.server";
import { createContext } from "./server";

export const DEMO_PASSWORD_FOR_TESTS = "test-password-1";
/** Headers of a request made by a Calmcrest page served from this server: pass to `.set()` on every POST/PATCH/DELETE. */
export const SAME_ORIGIN = { Origin: "http://calmcrest.test", Host: "calmcrest.test" } as const;

/**
 * A fresh server on a fresh temporary data directory, with the demo users (and, if asked, the demo scenario).
 * Removed after the test file. Never touches ./data.
 */
export async function createTestServer(options: { seed?: "users" | "full" | "none"; env?: Record<string, string>; dataDir?: string } = {}) {
  // A given dataDir reopens an existing data directory (a restart); its first owner removes it.
  const ownsDataDir = options.dataDir === undefined;
  const dataDir = options.dataDir ?? mkdtempSync(join(tmpdir(), "calmcrest-test-"));
  const env = parseEnv({
    NODE_ENV: "test",
    CALMCREST_DATA_DIR: dataDir,
    DEMO_PASSWORD: DEMO_PASSWORD_FOR_TESTS,
    CALMCREST_SEED: options.seed ?? "users",
    ...options.env,
  });
  const context: AppContext = await createContext(env);
  const app: Express = createApp(context);
  afterAll(async () => {
    await context.close();
    if (ownsDataDir) rmSync(dataDir, { recursive: true, force: true });
  });
  return { app, context, dataDir };
}

/** A supertest agent signed in as the demo user with that role; state-changing calls carry the right Origin. */
export async function signedInAgent(app: Express, role: "admin" | "lead" | "engineer" | "committee") {
  const agent = request.agent(app);
  const response = await agent
    .post("/api/auth/sign-in")
    .set(SAME_ORIGIN)
    .send({ email: `${role}@calmcrest.test`, password: DEMO_PASSWORD_FOR_TESTS });
  if (response.status !== 200) throw new Error(`sign-in as ${role} failed: ${response.status} ${JSON.stringify(response.body)}`);
  return agent;
}
