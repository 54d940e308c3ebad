import { queryOptions } from "@tanstack/react-query";
import type { Me, PasswordLinkInfo, ResetRequestInput, SetPasswordInput, SignInInput } from "@calmcrest/contracts";
import { ApiError, api } from "./client";
import { meKeys, passwordLinkKey } from "./query-keys";

/** The signed-in user, or null when signed out. */
export const meQuery = queryOptions({
  queryKey: meKeys.all,
  queryFn: async (): Promise<Me | null> => {
    try {
      return await api<Me>("/me");
    } catch (error) {
      if (error instanceof ApiError && error.status === 401) return null;
      throw error;
    }
  },
  staleTime: 60_000,
});

export const signIn = (input: SignInInput) => api<Me>("/auth/sign-in", { body: input });
export const signOut = () => api<{ ok: true }>("/auth/sign-out", { method: "POST" });
export const signOutEverywhere = () => api<{ ok: true }>("/auth/sign-out-everywhere", { method: "POST" });

export const passwordLinkQuery = (token: string) =>
  queryOptions({
    queryKey: passwordLinkKey(token),
    queryFn: () => api<PasswordLinkInfo>(`/auth/password-links/${encodeURIComponent(token)}`),
    retry: false,
    staleTime: Infinity,
  });
export const setPassword = (token: string, input: SetPasswordInput) => api<{ ok: true; email: string }>(`/auth/password-links/${encodeURIComponent(token)}`, { body: input });
export const requestPasswordReset = (input: ResetRequestInput) => api<{ ok: true; message: string }>("/auth/password-reset", { body: input });
