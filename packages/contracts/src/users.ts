import { z } from "zod";
import type { AccountStatus, AuditListItem } from "./audit";
import { ROLES, type Role } from "./auth";
import { checkPasswordRules, passwordField } from "./passwords";

const emailField = z.string().trim().toLowerCase().email("Enter a valid e-mail address.");
const nameField = z.string().trim().min(1, "Enter the person's name.").max(120, "Keep the name under 120 characters.");
const roleField = z.enum(ROLES, { error: "role must be admin, lead, engineer or committee." });

/** Body of `POST /api/users` (admin): an account with a first password typed by the administrator. */
export const createUserSchema = z
  .object({
    // People type e-mail in any case; accounts are stored lower-case.
    email: emailField,
    name: nameField,
    role: roleField,
    password: passwordField,
  })
  .superRefine(checkPasswordRules);
export type CreateUserInput = z.infer<typeof createUserSchema>;

/**
 * Body of `POST /api/users/invitations` (admin): the person gets an e-mail with a one-time link (72 hours) to choose
 * their password. Campaigns only for field engineers (other roles see by role).
 */
export const inviteSchema = z.object({
  email: emailField,
  name: nameField,
  role: roleField,
  campaignIds: z.array(z.number().int().positive()).max(200).default([]),
});
export type InviteInput = z.output<typeof inviteSchema>;
export type InviteFormInput = z.input<typeof inviteSchema>;

export type PasswordLinkPurpose = "invite" | "reset";

/** `GET /api/auth/password-links/:token`: what a one-time link is for (the link itself is the credential). */
export interface PasswordLinkInfo {
  purpose: PasswordLinkPurpose;
  email: string;
  name: string;
  expiresAt: string;
}

/** Body of `POST /api/auth/password-links/:token` (the rules that need the person are checked by the server). */
export const setPasswordSchema = z.object({ password: passwordField.min(1, "Choose a password.") });
export type SetPasswordInput = z.infer<typeof setPasswordSchema>;

/** Body of `POST /api/auth/password-reset` (anyone): the same answer whether or not an account has the address. */
export const resetRequestSchema = z.object({ email: emailField });
export type ResetRequestInput = z.infer<typeof resetRequestSchema>;

/** Body of `PATCH /api/users/:id` (admin). `undo` marks the change as the undo of the one just made. */
export const patchUserSchema = z.object({ role: roleField, undo: z.boolean().optional() });
export type PatchUserInput = z.infer<typeof patchUserSchema>;

/** Body of `POST /api/users/:id/email` (admin). */
export const changeEmailSchema = z.object({ email: emailField });
export type ChangeEmailInput = z.infer<typeof changeEmailSchema>;

/** One row of `GET /api/users` (admin). */
export interface UserListItem {
  id: string;
  email: string;
  name: string;
  role: Role;
  /** invited: has not chosen a password yet; deactivated: cannot sign in (kept, never deleted). */
  status: AccountStatus;
  createdAt: string;
  /** The last successful sign-in, or null. */
  lastSignInAt: string | null;
  /** Campaigns this user is a member of. */
  campaigns: { id: number; name: string; siteName: string }[];
}

/** `GET /api/users/:id` (admin): one person's page. */
export interface UserDetail extends UserListItem {
  /** The latest audit rows by the person or about their account (sign-ins, role changes), newest first (20). */
  recentActions: AuditListItem[];
  /** Whether this person is the last active administrator (cannot be demoted or deactivated). */
  lastActiveAdmin: boolean;
}

/** What each role may do, as short plain phrases (the role-change confirmation lists what is gained and lost). */
export const ROLE_ABILITIES: Record<Role, readonly string[]> = {
  admin: ["read every site and campaign", "manage people, roles and campaign access", "read the audit log", "read reports"],
  lead: ["read every site and campaign", "create and change sites and campaigns", "upload logs to every campaign", "exclude time windows", "read reports"],
  engineer: ["read the sites of their own campaigns", "upload logs to their own campaigns", "exclude time windows in their own campaigns"],
  committee: ["read reports"],
};

/** What a person gains and loses when their role changes from `from` to `to`. */
export function roleChangeEffects(from: Role, to: Role): { gains: string[]; loses: string[] } {
  const before = new Set(ROLE_ABILITIES[from]);
  const after = new Set(ROLE_ABILITIES[to]);
  return { gains: [...after].filter((ability) => !before.has(ability)), loses: [...before].filter((ability) => !after.has(ability)) };
}
