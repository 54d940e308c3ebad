import { randomUUID } from "node:crypto";
import type { Role } from "@calmcrest/contracts";
import type { Knex } from "knex";
import { hashPassword } from "../auth/passwords.server";

// Demo accounts only: invented people of the invented survey consortium. Never seeded with NODE_ENV=production.
export const DEMO_USERS: { email: string; name: string; role: Role }[] = [
  { email: "admin@calmcrest.test", name: "Ines Okafor", role: "admin" },
  { email: "lead@calmcrest.test", name: "Tomas Reyvik", role: "lead" },
  { email: "engineer@calmcrest.test", name: "Lena Marchetti", role: "engineer" },
  { email: "committee@calmcrest.test", name: "Priya Halvorsen", role: "committee" },
];

/** Creates the demo users that do not exist yet. Returns how many were created. */
export async function seedDemoUsers(knex: Knex, password: string): Promise<number> {
  let created = 0;
  const passwordHash = await hashPassword(password);
  for (const user of DEMO_USERS) {
    const existing = await knex("user").where({ email: user.email }).first();
    if (existing) continue;
    await knex("user").insert({ id: randomUUID(), ...user, password_hash: passwordHash });
    created += 1;
  }
  return created;
}
