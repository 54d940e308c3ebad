import type { Knex } from "knex";
import { describeAuditEntry, isAuditAction, type AuditAction, type AuditListItem, type AuditPage, type AuditQuery } from "@calmcrest/contracts";
import type { StoreCore } from "./core";

// The audit log: written only through StoreCore.write (scope.audit), in the transaction of the change it records.
// Never updated or deleted (the database refuses both: triggers of migration 20261205_0002_accounts).

export interface AuditRow {
  id: number;
  at: string;
  userId: string | null;
  action: string;
  targetType: string;
  targetId: string;
  details: Record<string, unknown>;
}

interface AuditDbRow {
  id: number;
  at: string;
  user_id: string | null;
  action: string;
  target_type: string;
  target_id: string;
  details: string;
}

interface AuditJoinedRow extends AuditDbRow {
  actor_name: string | null;
  actor_email: string | null;
}

/** The largest CSV export (rows); a wider one is refused with a hint to narrow the filters. */
export const MAX_AUDIT_EXPORT_ROWS = 100_000;

const parseDetails = (text: string) => JSON.parse(text) as Record<string, unknown>;

export function auditStore(core: StoreCore) {
  /** The rows matching the filters: the person acted, or the row is about their account. */
  function filtered(filter: Omit<AuditQuery, "page" | "pageSize">): Knex.QueryBuilder {
    const query = core.knex("audit_log");
    if (filter.userId !== undefined) {
      const userId = filter.userId;
      void query.where((inner) => {
        void inner.where("audit_log.user_id", userId).orWhere((about) => void about.where("audit_log.target_type", "user").andWhere("audit_log.target_id", userId));
      });
    }
    if (filter.action !== undefined) void query.where("audit_log.action", filter.action);
    // `at` is an ISO instant in UTC, so whole days compare as text.
    if (filter.from !== undefined) void query.where("audit_log.at", ">=", `${filter.from}T00:00:00.000Z`);
    if (filter.to !== undefined) void query.where("audit_log.at", "<", nextDay(filter.to));
    return query;
  }

  function item(row: AuditJoinedRow, names: Map<string, string>): AuditListItem {
    // The store writes only actions of the vocabulary (StoreCore.write refuses others), so every stored row has one.
    if (!isAuditAction(row.action)) throw new Error(`Audit row ${row.id} has the action ${row.action}, which is not in the vocabulary (packages/contracts/src/audit.ts).`);
    const action: AuditAction = row.action;
    const details = parseDetails(row.details);
    return {
      id: row.id,
      at: row.at,
      actor: row.user_id && row.actor_name !== null && row.actor_email !== null ? { id: row.user_id, name: row.actor_name, email: row.actor_email } : null,
      action,
      targetType: row.target_type,
      targetId: row.target_id,
      details,
      summary: describeAuditEntry(action, details, row.target_id, (id) => names.get(id)),
    };
  }

  async function rowsOf(query: Knex.QueryBuilder): Promise<AuditListItem[]> {
    const rows = await query
      .leftJoin("user", "user.id", "audit_log.user_id")
      .select<AuditJoinedRow[]>("audit_log.*", "user.name as actor_name", "user.email as actor_email");
    // Names of the people rows are about (member ids, accounts), so a summary reads "Lena Marchetti", not an id.
    const names = new Map((await core.knex("user").select<{ id: string; name: string }[]>("id", "name")).map((user) => [user.id, user.name]));
    return rows.map((row) => item(row, names));
  }

  return {
    /** Audit rows, oldest first; optionally of one item only. */
    async list(filter: { targetType?: string; targetId?: string | number } = {}): Promise<AuditRow[]> {
      const query = core.knex("audit_log").orderBy("id").select<AuditDbRow[]>("*");
      if (filter.targetType !== undefined) void query.where({ target_type: filter.targetType });
      if (filter.targetId !== undefined) void query.where({ target_id: String(filter.targetId) });
      const rows = await query;
      return rows.map((row) => ({
        id: row.id,
        at: row.at,
        userId: row.user_id,
        action: row.action,
        targetType: row.target_type,
        targetId: row.target_id,
        details: parseDetails(row.details),
      }));
    },

    /** The actions recorded for an item (or every item of a type), oldest first. */
    async actions(targetType: string, targetId?: string | number): Promise<string[]> {
      const rows = await this.list(targetId === undefined ? { targetType } : { targetType, targetId });
      return rows.map((row) => row.action);
    },

    /** One page of the audit log, newest first, with the number of matching rows. */
    async page(query: AuditQuery): Promise<AuditPage> {
      const countRow = await filtered(query).count<{ n: number }[]>({ n: "*" }).first();
      const total = Number(countRow?.n ?? 0);
      const rows = await rowsOf(filtered(query).orderBy("audit_log.id", "desc").limit(query.pageSize).offset((query.page - 1) * query.pageSize));
      return { rows, total, page: query.page, pageSize: query.pageSize };
    },

    /** Every matching row, newest first (for the CSV export); null when there are more than MAX_AUDIT_EXPORT_ROWS. */
    async exportRows(query: Omit<AuditQuery, "page" | "pageSize">): Promise<AuditListItem[] | null> {
      const countRow = await filtered(query).count<{ n: number }[]>({ n: "*" }).first();
      if (Number(countRow?.n ?? 0) > MAX_AUDIT_EXPORT_ROWS) return null;
      return rowsOf(filtered(query).orderBy("audit_log.id", "desc"));
    },
  };
}

function nextDay(day: string): string {
  const date = new Date(`${day}T00:00:00.000Z`);
  date.setUTCDate(date.getUTCDate() + 1);
  return date.toISOString();
}

export type AuditStore = ReturnType<typeof auditStore>;
