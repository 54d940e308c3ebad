import { queryOptions } from "@tanstack/react-query";
import type { CreateUserInput, PatchUserInput, UserListItem } from "@calmcrest/contracts";
import { api } from "./client";

export const usersQuery = queryOptions({
  queryKey: ["users", "list"],
  queryFn: () => api<UserListItem[]>("/users"),
});

export const createUser = (input: CreateUserInput) => api<UserListItem>("/users", { body: input });
export const patchUser = (userId: string, input: PatchUserInput) =>
  api<UserListItem>(`/users/${encodeURIComponent(userId)}`, { method: "PATCH", body: input });
