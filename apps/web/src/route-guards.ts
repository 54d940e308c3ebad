import type { QueryClient } from "@tanstack/react-query";
import { redirect } from "react-router-dom";
import type { Me, Role } from "@calmcrest/contracts";
import { meQuery } from "./api/auth";

/** Loader part for every signed-in page: the user, or a redirect to sign-in that comes back here afterwards. */
export async function requireMe(queryClient: QueryClient, request: Request): Promise<Me> {
  const me = await queryClient.ensureQueryData(meQuery);
  if (!me) {
    const url = new URL(request.url);
    throw redirect(`/sign-in?next=${encodeURIComponent(url.pathname + url.search)}`);
  }
  return me;
}

/** Loader for a page only some roles may use: others get the "not for your role" page (HTTP-like 403). */
export function roleLoader(queryClient: QueryClient, roles: readonly Role[]) {
  return async ({ request }: { request: Request }) => {
    const me = await requireMe(queryClient, request);
    if (!roles.includes(me.role)) {
      throw new Response("This page is not part of your role's work.", { status: 403, statusText: "Not for your role" });
    }
    return null;
  };
}
