import type { Role } from "@calmcrest/contracts";
import { hashPassword } from "../auth/passwords.server";
import type { Store } from "../store/index";

// Demo accounts only: invented people of the invented survey consortium. Never seeded with NODE_ENV=production.
export const DEMO_USERS: { email: string; name: string; role: Role }[] = [
  { email: "admin@calmcrest.test", name: "Ines Okafor", role: "admin" },
  { email: "lead@calmcrest.test", name: "Tomas Reyvik", role: "lead" },
  { email: "engineer@calmcrest.test", name: "Lena Marchetti", role: "engineer" },
  { email: "committee@calmcrest.test", name: "Priya Halvorsen", role: "committee" },
];

/** Creates the demo users that do not exist yet (through the store, so each has its audit row). Returns how many were created. */
export async function seedDemoUsers(store: Store, password: string): Promise<number> {
  let created = 0;
  const passwordHash = await hashPassword(password);
  for (const user of DEMO_USERS) {
    if (await store.users.idByEmail(user.email)) continue;
    await store.users.create(null, user, passwordHash, { demo: true });
    created += 1;
  }
  return created;
}
