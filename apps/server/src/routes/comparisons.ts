import { comparisonQuerySchema } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { FIELD_ROLES } from "../access/access.server";
import { parseOr400 } from "../http/errors";
import { ApiRouter } from "../http/route-table";
import { currentUser } from "../http/session";
import { compareForUserAnswer } from "../summaries/compare.server";
import { sendAnswer } from "../summaries/summary-service.server";

/** /api/comparisons: 2 to 6 sites or campaigns side by side, with the access of the site and campaign pages. */
export function comparisonRoutes(context: AppContext): ApiRouter {
  const routes = new ApiRouter("/comparisons");

  // Committee members read published reports only (403); each site or campaign is checked for the caller (404).
  routes.route("GET", "/", { access: FIELD_ROLES }, async (req, res) => {
    const query = parseOr400(comparisonQuerySchema, req.query, "The comparison query");
    sendAnswer(req, res, await compareForUserAnswer(context, currentUser(res.locals), query));
  });

  return routes;
}
