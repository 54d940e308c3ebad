import type { AppContext } from "../context";
import { seedDemoScenario } from "./demo-scenario";
import { seedDemoUsers } from "./demo-users";

// Steps that fill an empty database with the demo scenario, run in order after the users exist.
export const demoScenarioSteps: ((context: AppContext) => Promise<void>)[] = [
  async (context) => {
    const startedMs = Date.now();
    await seedDemoScenario(context);
    console.log(`Calmcrest: seeded the demo scenario (four invented candidate ridges) in ${((Date.now() - startedMs) / 1000).toFixed(1)} s.`);
  },
];

/** Seeds the demo scenario when the database has no users yet. Never in production. */
export async function seedIfEmpty(context: AppContext): Promise<void> {
  const { env, store } = context;
  if (env.NODE_ENV === "production" || env.CALMCREST_SEED === "none") return;
  if ((await store.users.count()) > 0) return;
  await seedDemoUsers(store, env.DEMO_PASSWORD);
  console.log("Calmcrest: seeded the demo users (demo only; see README).");
  if (env.CALMCREST_SEED === "full") {
    for (const step of demoScenarioSteps) await step(context);
  }
}
