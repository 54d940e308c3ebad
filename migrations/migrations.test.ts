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

describe("upgrading a database that already holds data", () => {
  it("migrates a database from the first release, with uploads and samples and foreign keys on, to the latest", async () => {
    const db = knexFactory({
      client: "better-sqlite3",
      connection: { filename: ":memory:" },
      useNullAsDefault: true,
      // As the server opens every connection (apps/server/src/db/tune.server.ts): foreign keys enforced.
      pool: { afterCreate: (connection: { pragma(sql: string): unknown }, done: (error: Error | null, connection: unknown) => void) => { connection.pragma("foreign_keys = ON"); done(null, connection); } },
    });
    try {
      // The schema the first release shipped with (its last migration was 20261203_0001).
      for (;;) {
        await db.migrate.up({ migrationSource });
        const [, pending] = (await db.migrate.list({ migrationSource })) as [unknown[], string[]];
        const done = (await db("knex_migrations").select("name")).map((row: { name: string }) => row.name);
        if (done.includes("20261203_0001_hash_session_ids") || pending.length === 0) break;
      }
      const now = new Date().toISOString();
      const [site] = await db("site").insert({ name: "S", latitude: 0, longitude: 0, elevation_m: 0, created_at: now, updated_at: now }).returning<{ id: number }[]>("id");
      const [campaign] = await db("campaign")
        .insert({ site_id: site?.id, name: "C", aperture_mm: 60, baseline_mm: 200, wavelength_nm: 500, response: "z-tilt", status: "running", created_at: now, updated_at: now })
        .returning<{ id: number }[]>("id");
      const [upload] = await db("upload")
        .insert({ campaign_id: campaign?.id, file_name: "a.csv", size_bytes: 1, sha256: "ab", uploaded_at: now, mapping: "{}", status: "done" })
        .returning<{ id: number }[]>("id");
      await db("sample").insert({ campaign_id: campaign?.id, time_ms: 1_700_000_000_000, upload_id: upload?.id, seeing_arcsec: 0.8, r0_cm: 12.6, zenith_deg: 20, anisotropic: 0 });

      await db.migrate.latest({ migrationSource });

      const [, pending] = (await db.migrate.list({ migrationSource })) as [unknown[], string[]];
      expect(pending).toEqual([]);
      expect(await db("sample").count({ n: "*" }).first()).toEqual({ n: 1 });
      expect(await db("upload").where({ id: upload?.id }).first()).toMatchObject({ sha256: "ab", withdrawn_at: null, replaces_upload_id: null });
      expect(await db.raw("PRAGMA foreign_key_check")).toEqual([]);
    } finally {
      await db.destroy();
    }
  });
});
