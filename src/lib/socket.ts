// Live updates: one socket.io connection (same origin, the session cookie authenticates the handshake). Each
// server event maps to the cache families it makes stale; screens never refetch by hand.
import { io, type Socket } from "socket.io-client";
import type { QueryClient, QueryKey } from "@tanstack/react-query";
import { rootKeys } from "./query.ts";
import type { CaptureStatus, GradeValue } from "./contracts.ts";

/** The events server/realtime.ts sends to browsers (EVENT_AUDIENCE; payloads as in docs/api.md "Live updates"). */
export interface ServerEvents {
  /** `error` only with status "failed". */
  "capture:status": (e: { id: number; assetId: number; status: CaptureStatus; error?: string | null }) => void;
  /** kind "rotor" (level "R1".."R5") or "vibration" (level a zone letter). */
  "finding:new": (e: { id: number; assetId: number; kind: string; level: GradeValue }) => void;
  "inspection:changed": (e: { id: number }) => void;
  /** An analyst set a verdict on a finding (confirmed, dismissed, remeasure). */
  "finding:verdict": (e: { id: number; assetId: number; verdict: string }) => void;
}
export type ServerEventName = keyof ServerEvents;

/** Which query families each event invalidates (prefix match). */
export const EVENT_INVALIDATIONS: Record<ServerEventName, readonly QueryKey[]> = {
  "capture:status": [rootKeys.captures, rootKeys.assets, rootKeys.review, rootKeys.fleet, rootKeys.findings],
  "finding:new": [rootKeys.findings, rootKeys.review, rootKeys.fleet, rootKeys.assets],
  "inspection:changed": [rootKeys.inspections, rootKeys.fleet, rootKeys.findings],
  "finding:verdict": [rootKeys.findings, rootKeys.review, rootKeys.fleet, rootKeys.assets, rootKeys.inspections],
};

type Listener = (payload: unknown) => void;
const listeners = new Map<ServerEventName, Set<Listener>>();
let socket: Socket | null = null;
const connectionListeners = new Set<(connected: boolean) => void>();
const announce = (connected: boolean) => connectionListeners.forEach((fn) => fn(connected));

/** Connect (once) and wire events to the query cache. Returns a function that disconnects. */
export function connectSocket(queryClient: QueryClient): () => void {
  if (socket) return disconnectSocket;
  const s = io({ withCredentials: true, transports: ["websocket", "polling"], reconnectionDelayMax: 10_000 });
  socket = s;
  s.on("connect", () => announce(true));
  s.on("disconnect", () => announce(false));
  for (const event of Object.keys(EVENT_INVALIDATIONS) as ServerEventName[]) {
    s.on(event as string, (payload: unknown) => {
      if (event === "capture:status") rememberCaptureStatus(payload as CaptureStatusEvent);
      for (const key of EVENT_INVALIDATIONS[event]) void queryClient.invalidateQueries({ queryKey: key });
      for (const fn of listeners.get(event) ?? []) fn(payload);
    });
  }
  // The server closes the socket when the session ends (expired, deactivated, role changed). Re-reading the
  // session sends an ended one to Sign in; after a role change it returns the new role, whose navigation and
  // live-update rooms differ, so connect again.
  s.on("session:ended", (e: { reason?: string }) => {
    void queryClient.invalidateQueries({ queryKey: rootKeys.session });
    if (e?.reason === "role-changed") setTimeout(() => s.connect(), 500);
  });
  // After a reconnect we may have missed events: refresh what they would have touched.
  s.io.on("reconnect", () => {
    for (const keys of Object.values(EVENT_INVALIDATIONS)) for (const key of keys) void queryClient.invalidateQueries({ queryKey: key });
  });
  return disconnectSocket;
}

type CaptureStatusEvent = Parameters<ServerEvents["capture:status"]>[0];
const RECENT_CAPTURES = 200;
const recentCaptureStatus = new Map<number, CaptureStatusEvent>();

/** Keep the latest live status of recent captures, so a screen that learns a capture's id after its event
 *  arrived (the upload answer and the worker's first event race) still starts from it. */
function rememberCaptureStatus(e: CaptureStatusEvent) {
  if (typeof e?.id !== "number") return;
  recentCaptureStatus.delete(e.id);
  recentCaptureStatus.set(e.id, e);
  if (recentCaptureStatus.size > RECENT_CAPTURES) recentCaptureStatus.delete(recentCaptureStatus.keys().next().value!);
}

/** The last capture:status event this page received for a capture, if any (of the last 200 captures). */
export function lastCaptureStatus(id: number): CaptureStatusEvent | undefined {
  return recentCaptureStatus.get(id);
}

export function disconnectSocket() {
  socket?.disconnect();
  socket = null;
  announce(false);
}

/** Listen to one server event (e.g. to update an upload row at once). Returns the unsubscribe function. */
export function onServerEvent<E extends ServerEventName>(event: E, fn: (payload: Parameters<ServerEvents[E]>[0]) => void): () => void {
  let set = listeners.get(event);
  if (!set) listeners.set(event, (set = new Set()));
  set.add(fn as Listener);
  return () => set!.delete(fn as Listener);
}

export function isSocketConnected(): boolean {
  return !!socket?.connected;
}

/** Be told when the live connection comes up or drops. Returns the unsubscribe function. */
export function onConnectionChange(fn: (connected: boolean) => void): () => void {
  connectionListeners.add(fn);
  return () => connectionListeners.delete(fn);
}
