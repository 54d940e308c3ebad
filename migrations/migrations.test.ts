import knexFactory from "knex";
import { afterAll, describe, expect, it } from "vitest";
import { migrationSource } from "./index";

const knex = knexFactory({ client: "better-sqlite3", connection: { filename: ":memory:" }, useNullAsDefault: true });
afterAll(() => knex.destroy());

describe("migrations", () => {
  it("create every table, and roll back to an empty database", async () => {
    await knex.migrate.latest({ migrationSource });
    const tables = (await knex.raw<{ name: string }[]>("select name from sqlite_master where type = 'table' and name not like 'knex_%' and name not like 'sqlite_%' order by name")).map((row) => row.name);
    expect(tables).toEqual(expect.arrayContaining(["user", "session", "site", "campaign", "campaign_member", "upload", "sample", "exclusion", "audit_log", "outbox", "report", "report_section", "report_version", "report_share", "report_comment"]));
    await knex.migrate.rollback({ migrationSource }, true);
    const left = (await knex.raw<{ name: string }[]>("select name from sqlite_master where type = 'table' and name not like 'knex_%' and name not like 'sqlite_%'")).map((row) => row.name);
    expect(left).toEqual([]);
  });
});
