import type { User } from "lucia";
import type { Role } from "@calmcrest/contracts";
import { notFound } from "../http/errors";

// Who may do what with field data (sites, campaigns, uploads, summaries). Committee members are stopped earlier,
// by the role guard declared on each field route (403): they will read published reports only.
//   admin:    reads every site and campaign, manages membership; does not upload or edit data.
//   lead:     reads, analyses, uploads, excludes and edits everywhere.
//   engineer: reads, uploads and excludes in the campaigns they are a member of; sees nothing else.
// A campaign or site outside one's access is answered with 404 and no data, so ids cannot be probed
// (store.campaigns.forUser, store.sites.forUser apply the membership part).

export const FIELD_ROLES = ["admin", "lead", "engineer"] as const satisfies readonly Role[];

export type CampaignAction = "read" | "upload" | "exclude" | "edit" | "manageMembers";

/** Whether the role may do the action in a campaign it can see. */
export function roleAllows(role: User["role"], action: CampaignAction): boolean {
  switch (action) {
    case "read":
      return role === "admin" || role === "lead" || role === "engineer";
    case "upload":
    case "exclude":
      return role === "lead" || role === "engineer";
    case "edit":
      return role === "admin" || role === "lead";
    case "manageMembers":
      return role === "admin";
  }
}

/** Parses a numeric route id; anything else is a 404 (no such item), not a 400. */
export function routeId(value: string | string[] | undefined, what: string): number {
  const id = Number(value);
  if (typeof value !== "string" || value === "" || !Number.isSafeInteger(id) || id <= 0) throw notFound(what);
  return id;
}
