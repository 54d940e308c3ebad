import type { AppDatabase } from "../db/database.server";
import type { SampleCache } from "../summaries/sample-cache.server";
import { accountLinksStore, type LinkLifetimes } from "./account-links";
import { auditStore } from "./audit";
import { campaignsStore } from "./campaigns";
import { StoreCore } from "./core";
import { exclusionsStore } from "./exclusions";
import { membershipsStore } from "./memberships";
import { outboxStore } from "./outbox";
import { reportsStore } from "./reports";
import { sitesStore } from "./sites";
import { uploadsStore } from "./uploads";
import { usersStore } from "./users";
import type { WriteGate } from "./write-gate";

// The store: the only code that speaks SQL to the application tables (routes -> store -> engine). One module
// per aggregate; every write runs in one transaction with its audit row and the cache invalidation it needs
// (StoreCore.write). Modules that must hear of every change register a listener with onChange.

export function createStore(db: AppDatabase, samples: SampleCache, gate: WriteGate, options: { publicBaseUrl?: string; linkLifetimes?: LinkLifetimes } = {}) {
  const core = new StoreCore(db, samples, gate, options.publicBaseUrl);
  const campaigns = campaignsStore(core);
  const audit = auditStore(core);
  return {
    core,
    /** Hook for later modules (outbox, comments, summary cache): hear every change, in its transaction and after commit. */
    onChange: core.onChange.bind(core),
    /** A write of a module not yet in the store: one transaction, its audit row, after-commit effects. */
    write: core.write.bind(core),
    sites: sitesStore(core),
    campaigns,
    memberships: membershipsStore(core),
    exclusions: exclusionsStore(core),
    uploads: uploadsStore(core, { campaignForUser: campaigns.forUser }),
    users: usersStore(core, audit),
    audit,
    /** Invitations and password resets: one-time links, stored hashed, with their e-mails. */
    accountLinks: accountLinksStore(core, options.linkLifetimes ?? { invitationMs: 72 * 3600_000, resetMs: 2 * 3600_000 }),
    /** E-mail waiting to be sent or sent; `queueMail(trx, …)` queues one inside a write (store/outbox.ts). */
    outbox: outboxStore(core),
    /** Committee reports: working copies, frozen versions, sharing, comments (and the e-mails they queue). */
    reports: reportsStore(core),
  };
}

export type Store = ReturnType<typeof createStore>;

export type { AuditEntry, Change, ChangeListener, WriteScope, WriteOptions } from "./core";
export { WriteGate } from "./write-gate";
export { monitorOf, monitorColumns, campaignMonitor, campaignListItem, type CampaignRow } from "./campaigns";
export { siteLocationOf, siteListItem, siteRef, type SiteRow } from "./sites";
export { uploadListItem, uploadCounts, effectiveCampaign, monitorForFile, readOptionsOf, type UploadRow, type MonitorOverride, type IngestRejections, type RecordResult } from "./uploads";
export { exclusionView, type ExclusionRow } from "./exclusions";
export type { UserRow } from "./users";
export type { AuditRow } from "./audit";
export { queueMail, type QueuedMail } from "./outbox";
