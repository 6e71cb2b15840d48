import { queryOptions, useQuery } from "@tanstack/react-query";
import { api, ApiError } from "./api.ts";
import type { Me, Permission, Role } from "./contracts.ts";
import { rootKeys } from "./query.ts";

export const sessionKeys = {
  all: rootKeys.session,
  me: () => [...rootKeys.session, "me"] as const,
};

/** The signed-in user and their permissions, or null when nobody is signed in. */
export const meQueryOptions = () =>
  queryOptions({
    queryKey: sessionKeys.me(),
    queryFn: async ({ signal }): Promise<Me | null> => {
      try {
        return await api<Me>("/me", { signal });
      } catch (err) {
        if (err instanceof ApiError && err.status === 401) return null;
        throw err;
      }
    },
    staleTime: 5 * 60_000,
  });

export function useSession() {
  const q = useQuery(meQueryOptions());
  const me = q.data ?? null;
  return {
    ...q,
    me,
    user: me?.user ?? null,
    can: (p: Permission) => hasPermission(me, p),
  };
}

export function hasPermission(me: Pick<Me, "permissions"> | null | undefined, p: Permission): boolean {
  return !!me && me.permissions.includes(p);
}

/** Where each role lands after signing in. */
export const LANDING: Record<Role, string> = {
  technician: "/my-work",
  analyst: "/review",
  planner: "/plan",
  manager: "/fleet",
  admin: "/admin",
};

export function landingPath(me: Me | null | undefined): string {
  if (!me) return "/sign-in";
  return LANDING[me.user.role] ?? "/fleet";
}

/** Only same-app paths may be used as a "next" after sign-in (no open redirects). */
export function safeNext(next: string | null | undefined): string | null {
  if (!next || !next.startsWith("/") || next.startsWith("//") || next.startsWith("/sign-in")) return null;
  return next;
}
