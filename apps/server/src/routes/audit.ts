import { auditQuerySchema, AUDIT_ACTION_LABELS, spreadsheetSafeCsv } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { HttpError, parseOr400 } from "../http/errors";
import { ApiRouter } from "../http/route-table";
import { MAX_AUDIT_EXPORT_ROWS } from "../store/audit";

/** /api/audit: the audit log for administrators (read only: nothing in Calmcrest changes or removes a row). */
export function auditRoutes({ store }: AppContext): ApiRouter {
  const routes = new ApiRouter("/audit");

  routes.route("GET", "/", { access: ["admin"] }, async (req, res) => {
    const query = parseOr400(auditQuerySchema, req.query, "The audit log filter");
    res.json(await store.audit.page(query));
  });

  routes.route("GET", "/export.csv", { access: ["admin"] }, async (req, res) => {
    const { page: _page, pageSize: _pageSize, ...filter } = parseOr400(auditQuerySchema, req.query, "The audit log filter");
    const rows = await store.audit.exportRows(filter);
    if (rows === null) {
      throw new HttpError(413, "too_many_rows", `The export would hold more than ${MAX_AUDIT_EXPORT_ROWS} rows. Narrow it by date, person or action and export again.`);
    }
    const csv = spreadsheetSafeCsv([
      ["id", "at_utc", "actor_name", "actor_email", "action", "action_label", "target_type", "target_id", "summary", "details_json"],
      ...rows.map((row) => [row.id, row.at, row.actor?.name, row.actor?.email, row.action, AUDIT_ACTION_LABELS[row.action], row.targetType, row.targetId, row.summary, JSON.stringify(row.details)]),
    ]);
    const stamp = new Date().toISOString().slice(0, 10);
    res.setHeader("Content-Type", "text/csv; charset=utf-8");
    res.setHeader("Content-Disposition", `attachment; filename="calmcrest-audit-${stamp}.csv"`);
    res.send(csv);
  });

  return routes;
}
