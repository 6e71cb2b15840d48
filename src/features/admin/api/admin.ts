import { queryOptions, useMutation, useQueryClient } from "@tanstack/react-query";
import { api, apiDelete, apiGet, apiUpload } from "../../../lib/api.ts";
import type { Gateway, Role, Site, User } from "../../../lib/contracts.ts";
import { rootKeys } from "../../../lib/query.ts";

export const adminKeys = {
  users: () => [...rootKeys.users, "list"] as const,
  gateways: () => [...rootKeys.gateways, "list"] as const,
};

export const usersQueryOptions = () => queryOptions({ queryKey: adminKeys.users(), queryFn: ({ signal }) => apiGet<{ items: User[] }>("/users", undefined, signal).then((r) => r.items) });
export const gatewaysQueryOptions = () =>
  queryOptions({ queryKey: adminKeys.gateways(), queryFn: ({ signal }) => apiGet<{ items: Gateway[] } | Gateway[]>("/gateways", undefined, signal).then((r) => (Array.isArray(r) ? r : r.items)) });

function useInvalidating<TVars, TData>(fn: (v: TVars) => Promise<TData>, ...keys: (readonly unknown[])[]) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => Promise.all(keys.map((k) => qc.invalidateQueries({ queryKey: k }))) });
}

export const useInviteUser = () => useInvalidating((b: { email: string; name: string; role: Role }) => api<User>("/users/invite", { method: "POST", body: b }), rootKeys.users, rootKeys.people, rootKeys.outbox);
export const usePatchUser = () =>
  useInvalidating(({ id, ...b }: { id: number; role?: Role; active?: boolean; name?: string }) => api<User>(`/users/${id}`, { method: "PATCH", body: b }), rootKeys.users, rootKeys.people);
export const useCreateSite = () => useInvalidating((b: { code: string; name: string; timezone: string }) => api<Site>("/sites", { method: "POST", body: b }), rootKeys.sites);
export const useAddArea = () => useInvalidating(({ siteId, name }: { siteId: number; name: string }) => api(`/sites/${siteId}/areas`, { method: "POST", body: { name } }), rootKeys.sites);
/** A deletion refreshes the lists also when it fails: a 404 means another admin was quicker. */
function useDeleting<TVars>(fn: (v: TVars) => Promise<unknown>, ...keys: (readonly unknown[])[]) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: fn, onSettled: () => Promise.all(keys.map((k) => qc.invalidateQueries({ queryKey: k }))) });
}

// Site and area names show in the fleet, the motor lists and pages, and the gateway list: those refresh too.
export const useUpdateSite = () =>
  useInvalidating(({ id, ...b }: { id: number; code: string; name: string; timezone: string }) => api<Site>(`/sites/${id}`, { method: "PATCH", body: b }), rootKeys.sites, rootKeys.fleet, rootKeys.assets, rootKeys.gateways);
export const useDeleteSite = () => useDeleting((id: number) => apiDelete(`/sites/${id}`), rootKeys.sites, rootKeys.fleet, rootKeys.gateways);
export const useRenameArea = () => useInvalidating(({ id, name }: { id: number; name: string }) => api(`/areas/${id}`, { method: "PATCH", body: { name } }), rootKeys.sites, rootKeys.fleet, rootKeys.assets);
export const useDeleteArea = () => useDeleting((id: number) => apiDelete(`/areas/${id}`), rootKeys.sites, rootKeys.fleet);
export const useCreateGateway = () => useInvalidating((b: { name: string; siteId: number }) => api<{ id: number; token: string }>("/gateways", { method: "POST", body: b }), rootKeys.gateways);
export const useRevokeGateway = () => useInvalidating((id: number) => api(`/gateways/${id}/revoke`, { method: "POST", body: {} }), rootKeys.gateways);

export interface ImportResult {
  created: number;
  updated: number;
  errors: { line: number; message: string }[];
}
export function importMotors(file: File, onProgress?: (f: number) => void) {
  const form = new FormData();
  form.append("file", file, file.name);
  return apiUpload<ImportResult>("/assets/import", form, { onProgress: (l, t) => onProgress?.(t ? l / t : 0) });
}
