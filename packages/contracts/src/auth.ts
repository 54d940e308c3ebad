import { z } from "zod";

/** The four kinds of people who use Calmcrest. Stored as these strings in `user.role`. */
export const ROLES = ["admin", "lead", "engineer", "committee"] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  admin: "Administrator",
  lead: "Survey lead",
  engineer: "Field engineer",
  committee: "Committee member",
};

/** Body of `POST /api/auth/sign-in`, shared by the sign-in form and the Express handler. */
export const signInSchema = z.object({
  // People type e-mail in any case; accounts are stored lower-case.
  email: z.string().trim().toLowerCase().email("Enter the e-mail address of your Calmcrest account."),
  password: z.string().min(1, "Enter your password."),
});
export type SignInInput = z.infer<typeof signInSchema>;

/** `GET /api/me`. */
export interface Me {
  id: string;
  email: string;
  name: string;
  role: Role;
}
