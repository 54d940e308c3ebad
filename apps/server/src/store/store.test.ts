import { describe, expect, it } from "vitest";
import { countRows, createTestServer, userIdOf } from "../test-support";
import type { Change } from "./index";

const { context } = await createTestServer();
const { store } = context;
const leadId = await userIdOf(context, "lead@calmcrest.test");
const ridge = { name: "Store Ridge", latitude: -25.1, longitude: -68.3, elevationM: 4200 };
const monitor = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: "z-tilt" as const };

describe("a store write", () => {
  it("commits the change and its audit row together, and runs its cache invalidation after the commit", async () => {
    context.samples.briefs.set("sentinel", null);
    const siteId = await store.sites.create(leadId, ridge);
    await store.campaigns.create(leadId, siteId, { name: "Store mast", monitor, status: "running" });
    expect(await store.audit.actions("site", siteId)).toEqual(["site.create"]);
    // campaigns.create clears the site list's briefs once it has committed.
    expect(context.samples.briefs.has("sentinel")).toBe(false);
  });

  it("rolls back both the change and its audit row when something fails after the write, and clears no cache", async () => {
    const sitesBefore = await countRows(context, "site");
    const auditBefore = await countRows(context, "audit_log");
    const siteId = await store.sites.create(leadId, { ...ridge, name: "Failing Ridge" });
    context.samples.briefs.set("sentinel", null);
    // A listener that fails inside the transaction, after the campaign row and its audit row were written.
    const remove = store.onChange({
      name: "failing test listener",
      inTransaction: () => {
        throw new Error("injected failure after the write");
      },
    });
    try {
      await expect(store.campaigns.create(leadId, siteId, { name: "Never stored", monitor, status: "running" })).rejects.toThrow(/injected failure/);
    } finally {
      remove();
    }
    expect(await countRows(context, "campaign", { name: "Never stored" })).toBe(0);
    expect(await countRows(context, "site")).toBe(sitesBefore + 1);
    // Only the site's own audit row was added; the campaign's rolled back with it.
    expect(await countRows(context, "audit_log")).toBe(auditBefore + 1);
    expect((await store.audit.list({ targetType: "campaign" })).some((row) => row.details.name === "Never stored")).toBe(false);
    expect(context.samples.briefs.has("sentinel")).toBe(true);
  });

  it("refuses a write that records no audit row, and keeps nothing of it", async () => {
    await expect(
      store.write(async ({ trx }) => {
        await trx("site").insert({ name: "Unaudited Ridge", latitude: 1, longitude: 2, elevation_m: 3, notes: "", created_at: "x", updated_at: "x" });
      }),
    ).rejects.toThrow(/no audit row/);
    expect(await countRows(context, "site", { name: "Unaudited Ridge" })).toBe(0);
  });

  it("tells listeners of every change inside its transaction and again after the commit, in order", async () => {
    const seen: string[] = [];
    const remove = store.onChange({
      name: "recording test listener",
      inTransaction: async (change: Change, trx) => {
        // The listener sees the change's own rows: it could write rows of its own that commit with them.
        const rows = await trx("site").where({ name: "Heard Ridge" }).select("id");
        seen.push(`in:${change.action}:${rows.length}`);
      },
      afterCommit: (change: Change) => {
        seen.push(`after:${change.action}`);
      },
    });
    try {
      const siteId = await store.sites.create(leadId, { ...ridge, name: "Heard Ridge" });
      await store.sites.update(leadId, siteId, { notes: "heard" });
    } finally {
      remove();
    }
    expect(seen).toEqual(["in:site.create:1", "after:site.create", "in:site.update:1", "after:site.update"]);
  });

  it("waits, without blocking, while an ingest holds the write gate, and writes once it is released", async () => {
    const gate = store.core.gate;
    gate.holdForIngest();
    let written = false;
    const write = store.sites.create(leadId, { ...ridge, name: "Gate Ridge" }).then(() => {
      written = true;
    });
    // The event loop keeps turning meanwhile (this timer fires), and the write has not happened.
    await new Promise((resolve) => setTimeout(resolve, 50));
    expect(written).toBe(false);
    expect(await countRows(context, "site", { name: "Gate Ridge" })).toBe(0);
    gate.releaseFromIngest();
    await write;
    expect(await countRows(context, "site", { name: "Gate Ridge" })).toBe(1);
  });
});
