import type { Role } from "@calmcrest/contracts";

export interface NavItem {
  to: string;
  label: string;
  roles: readonly Role[];
}

// The one list of top-level screens and who may use them; the shell shows only a role's own items.
export const NAV_ITEMS: readonly NavItem[] = [
  { to: "/sites", label: "Sites", roles: ["admin", "lead", "engineer"] },
  // Engineers compare the sites of their own campaigns (the server shows them nothing else).
  { to: "/compare", label: "Compare", roles: ["admin", "lead", "engineer"] },
  { to: "/upload", label: "Upload logs", roles: ["lead", "engineer"] },
  { to: "/reports", label: "Reports", roles: ["admin", "lead", "committee"] },
  { to: "/admin/people", label: "People and access", roles: ["admin"] },
  { to: "/admin/audit", label: "Audit log", roles: ["admin"] },
  { to: "/admin/outbox", label: "Outbox", roles: ["admin"] },
];

export const navFor = (role: Role) => NAV_ITEMS.filter((item) => item.roles.includes(role));

/** Where a role lands after sign-in. */
export const homeFor = (role: Role) => navFor(role)[0]?.to ?? "/reports";

/** Pages reached from a top-level screen rather than the navigation (a campaign is opened from its site). */
const OTHER_SCREENS: readonly { to: string; roles: readonly Role[] }[] = [{ to: "/campaigns", roles: ["admin", "lead", "engineer"] }];

export const mayUse = (role: Role, path: string) =>
  [...NAV_ITEMS, ...OTHER_SCREENS].some((item) => (path === item.to || path.startsWith(`${item.to}/`)) && item.roles.includes(role));
