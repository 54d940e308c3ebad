import { z } from "zod";
import { ROLES, type Role } from "./auth";

/** Body of `POST /api/users` (admin). */
export const createUserSchema = z.object({
  // People type e-mail in any case; accounts are stored lower-case.
  email: z.string().trim().toLowerCase().email("Enter a valid e-mail address."),
  name: z.string().trim().min(1, "Enter the person's name.").max(120),
  role: z.enum(ROLES, { error: "role must be admin, lead, engineer or committee." }),
  password: z.string().min(10, "The first password needs at least 10 characters.").max(200),
});
export type CreateUserInput = z.infer<typeof createUserSchema>;

/** Body of `PATCH /api/users/:id` (admin). */
export const patchUserSchema = z.object({ role: z.enum(ROLES, { error: "role must be admin, lead, engineer or committee." }) });
export type PatchUserInput = z.infer<typeof patchUserSchema>;

/** One row of `GET /api/users` (admin). */
export interface UserListItem {
  id: string;
  email: string;
  name: string;
  role: Role;
  createdAt: string;
  /** Campaigns this user is a member of. */
  campaigns: { id: number; name: string; siteName: string }[];
}
