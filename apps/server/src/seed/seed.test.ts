import { describe, expect, it } from "vitest";
import { createTestServer } from "../test-support";

describe("seeding in production", () => {
  it("creates no demo users when NODE_ENV is production", async () => {
    const { context } = await createTestServer({ env: { NODE_ENV: "production" } });
    const row = await context.db.knex("user").count<{ count: number }[]>({ count: "*" }).first();
    expect(Number(row?.count)).toBe(0);
  });
});
