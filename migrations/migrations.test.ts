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

describe("the upload withdrawal migration", () => {
  it("keeps the same bytes in one campaign to one first upload, while a re-read of them may share them", async () => {
    const db = knexFactory({ client: "better-sqlite3", connection: { filename: ":memory:" }, useNullAsDefault: true });
    try {
      await db.migrate.latest({ migrationSource });
      const now = new Date().toISOString();
      const [site] = await db("site").insert({ name: "S", latitude: 0, longitude: 0, elevation_m: 0, created_at: now, updated_at: now }).returning<{ id: number }[]>("id");
      const [campaign] = await db("campaign")
        .insert({ site_id: site?.id, name: "C", aperture_mm: 60, baseline_mm: 200, wavelength_nm: 500, response: "z-tilt", status: "running", created_at: now, updated_at: now })
        .returning<{ id: number }[]>("id");
      const upload = { campaign_id: campaign?.id, file_name: "a.csv", size_bytes: 1, sha256: "ab", uploaded_at: now, mapping: "{}", status: "done" };
      const [first] = await db("upload").insert(upload).returning<{ id: number }[]>("id");
      await expect(db("upload").insert(upload)).rejects.toThrow(/UNIQUE/);
      await expect(db("upload").insert({ ...upload, replaces_upload_id: first?.id })).resolves.toBeDefined();
    } finally {
      await db.destroy();
    }
  });
});
