import type { OutboxList } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route-table";

/** /api/outbox: every e-mail Calmcrest wrote, newest first, with both parts and its sending state (administrators). */
export function outboxRoutes(context: AppContext): ApiRouter {
  const { store, mail } = context;
  const routes = new ApiRouter("/outbox");

  routes.route("GET", "/", { access: ["admin"] }, async (_req, res) => {
    const body: OutboxList = { transport: mail.transport.name, messages: await store.outbox.list() };
    res.json(body);
  });

  return routes;
}
