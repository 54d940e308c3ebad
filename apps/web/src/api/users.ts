import { queryOptions } from "@tanstack/react-query";
import type { ChangeEmailInput, InviteFormInput, PasswordLinkPurpose, PatchUserInput, UserDetail, UserListItem } from "@calmcrest/contracts";
import { api } from "./client";
import { userKeys } from "./query-keys";

export const usersQuery = queryOptions({
  queryKey: userKeys.list(),
  queryFn: () => api<UserListItem[]>("/users"),
});

export const inviteUser = (input: InviteFormInput) => api<UserListItem>("/users/invitations", { body: input });
export const sendPasswordLink = (userId: string) => api<{ purpose: PasswordLinkPurpose; expiresAt: string }>(`/users/${encodeURIComponent(userId)}/password-link`, { method: "POST" });
export const patchUser = (userId: string, input: PatchUserInput) =>
  api<UserListItem>(`/users/${encodeURIComponent(userId)}`, { method: "PATCH", body: input });

export const userQuery = (userId: string) =>
  queryOptions({
    queryKey: userKeys.detail(userId),
    queryFn: () => api<UserDetail>(`/users/${encodeURIComponent(userId)}`),
  });

const userAction = (userId: string, action: "deactivate" | "reactivate" | "sign-out-everywhere") => api<UserListItem>(`/users/${encodeURIComponent(userId)}/${action}`, { method: "POST" });
export const deactivateUser = (userId: string) => userAction(userId, "deactivate");
export const reactivateUser = (userId: string) => userAction(userId, "reactivate");
export const signOutUserEverywhere = (userId: string) => userAction(userId, "sign-out-everywhere");
export const changeEmail = (userId: string, input: ChangeEmailInput) => api<UserListItem>(`/users/${encodeURIComponent(userId)}/email`, { body: input });
