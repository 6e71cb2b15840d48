import { queryOptions } from "@tanstack/react-query";
import { api } from "../../../lib/api.ts";
import type { Me } from "../../../lib/contracts.ts";
import { rootKeys } from "../../../lib/query.ts";

export const authKeys = {
  token: (token: string) => [...rootKeys.session, "token", token] as const,
};

export const signIn = (body: { email: string; password: string }) => api<Me>("/auth/login", { method: "POST", body });
export const requestReset = (email: string) => api<{ ok: true }>("/auth/forgot", { method: "POST", body: { email } });
export const setPassword = (token: string, password: string) => api<{ ok: true }>("/auth/set-password", { method: "POST", body: { token, password } });

export const tokenQueryOptions = (token: string) =>
  queryOptions({
    queryKey: authKeys.token(token),
    queryFn: () => api<{ kind: "invite" | "reset"; email: string; name: string }>(`/auth/token/${encodeURIComponent(token)}`),
    enabled: token.length > 0,
    retry: false,
  });
