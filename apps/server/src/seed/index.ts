import type { AppContext } from "../context";
import { seedDemoReport } from "./demo-report";
import { seedDemoScenario } from "./demo-scenario";
import { verifyPassword } from "../auth/passwords.server";
import { DEMO_USERS, seedDemoUsers } from "./demo-users";

// Steps that fill an empty database with the demo scenario, run in order after the users exist.
export const demoScenarioSteps: ((context: AppContext) => Promise<void>)[] = [
  async (context) => {
    const startedMs = Date.now();
    await seedDemoScenario(context);
    console.log(`Calmcrest: seeded the demo scenario (four invented candidate ridges) in ${((Date.now() - startedMs) / 1000).toFixed(1)} s.`);
  },
  async (context) => {
    await seedDemoReport(context);
    console.log("Calmcrest: seeded the demo report (two published versions and a comment thread).");
  },
];

/**
 * Seeds the demo scenario when the database has no users yet. Never in production. The seed mode comes from
 * CALMCREST_SEED, or, when that is unset, from HOST: the demo users' password is published, so they are created
 * by default only on a server that listens on loopback.
 */
export async function seedIfEmpty(context: AppContext): Promise<void> {
  const { env, store } = context;
  if (env.NODE_ENV === "production") return;
  if ((await store.users.count()) > 0) return;
  if (env.CALMCREST_SEED === "none") {
    if (!env.seedExplicit) {
      console.log(
        `Calmcrest: no demo accounts were created because the server listens on ${env.HOST}, which other machines can reach. Set CALMCREST_SEED=full to seed the demo anyway (its password is published), or create real accounts.`,
      );
    }
    return;
  }
  await seedDemoUsers(store, env.DEMO_PASSWORD);
  console.log("Calmcrest: seeded the demo users (demo only; see README).");
  if (env.CALMCREST_SEED === "full") {
    for (const step of demoScenarioSteps) await step(context);
  }
}

/**
 * The start-up warning for a demo server reachable from the network: a demo account that still takes the demo
 * password on a server that does not listen on loopback. Returns the warning printed, or null.
 */
export async function warnAboutReachableDemo(context: AppContext): Promise<string | null> {
  const { env, store } = context;
  if (env.listensOnLoopback) return null;
  const open: string[] = [];
  for (const { email } of DEMO_USERS) {
    const account = await store.users.credentials(email);
    if (account && (await verifyPassword(account.passwordHash, env.DEMO_PASSWORD))) open.push(email);
  }
  if (open.length === 0) return null;
  const warning = `Calmcrest WARNING: this is a demo server listening on ${env.HOST}, reachable from other machines, and the demo accounts ${open.join(", ")} still take the published demo password. Anyone on the network can sign in. Listen on 127.0.0.1 (HOST), or change those passwords, or remove the accounts.`;
  console.warn(warning);
  return warning;
}
