// Live updates over socket.io, and the gateway stream namespace.
//
// Browsers connect to the default namespace with their session cookie (bh_session); each socket joins
// "role:<role>" and "user:<id>". An event goes only to the role rooms whose role holds the event's permission
// (EVENT_AUDIENCE below).
//
// Delivering each event to each client exactly once, with several server processes on one database:
//   • Events raised inside a server process (ctx.services.publish) go through the PostgreSQL adapter: `io.to(rooms)
//     .emit` reaches the sockets of every server process once. They are NOT sent as NOTIFY on barhound_events.
//   • Events raised elsewhere (the worker process, or any code calling notifyEvent from server/events.ts) arrive on
//     every server through LISTEN barhound_events; each server forwards them to its OWN sockets only (`io.local`),
//     never through the adapter. Every server hears the NOTIFY once, so every client gets it once.
// So there are two entry paths but each event takes exactly one of them; a server never re-broadcasts what it heard.

import type http from "node:http";
import pg from "pg";
import { pino } from "pino";
import { Server, type Socket } from "socket.io";
import { createAdapter } from "@socket.io/postgres-adapter";
import type { AppContext } from "./context.ts";
import jwt from "jsonwebtoken";
import { tokenFromCookieHeader, userFromToken } from "./auth.ts";
import type { SessionUser } from "./http.ts";
import { ROLES, can, type Permission } from "./permissions.ts";
import { EVENTS_CHANNEL, notifyEvent } from "./events.ts";
import { GATEWAY_NAMESPACE, MAX_CHUNK_BYTES } from "./gateway/protocol.ts";
import { attachGatewayNamespace, gatewayRoom, type StoreCaptureFn } from "./gateway/namespace.ts";

/** Who may receive an event: the permission a role needs. Exact names first, then prefixes ending in ":". */
export const EVENT_AUDIENCE: Record<string, Permission> = {
  "capture:status": "fleet.read",
  "finding:new": "fleet.read",
  "finding:verdict": "fleet.read",
  "inspection:changed": "fleet.read",
  /** Analyst-only events (none sent yet); the prefix rule keeps any future one from technicians and planners. */
  "review:": "review.read",
};

export function audienceOf(event: string): Permission | null {
  if (EVENT_AUDIENCE[event]) return EVENT_AUDIENCE[event];
  const prefix = event.includes(":") ? event.slice(0, event.indexOf(":") + 1) : "";
  return prefix && EVENT_AUDIENCE[prefix] ? EVENT_AUDIENCE[prefix] : null;
}

/** Server-to-server message (through the adapter): drop the sockets of a revoked gateway. */
const GATEWAY_REVOKED = "gateway:revoked";
/** Server-to-server message: drop a user's browser sockets (deactivated, role changed). */
const USER_ENDED = "user:ended";

/** Why a browser socket is closed by the server; sent as `session:ended { reason, message }` just before. */
export type SessionEndReason = "expired" | "deactivated" | "role-changed";
const SESSION_END_MESSAGE: Record<SessionEndReason, string> = {
  expired: "Your session has expired. Sign in again.",
  deactivated: "Your account was deactivated by an admin.",
  "role-changed": "Your role was changed by an admin; reconnect to receive the updates of your new role.",
};

/** How often each server re-reads the users behind its browser sockets (catches changes made outside the API). */
const REVALIDATE_MS = 60_000;

interface BrowserSocketData {
  user: SessionUser;
  /** The session JWT's expiry, ms since the epoch (Infinity without one). */
  expiresAt: number;
  ended?: boolean;
}

export const roleRoom = (role: string) => `role:${role}`;
export const userRoom = (id: number) => `user:${id}`;
const roomsFor = (permission: Permission) => ROLES.filter((r) => can(r, permission)).map(roleRoom);

export interface Realtime {
  io: Server;
  /** Send an event raised in this process to every allowed browser on every server process. */
  publish(event: string, payload: unknown): void;
  /** Tell a gateway its token was revoked and drop its connections, on whichever server process they are. */
  disconnectGateway(gatewayId: number, message: string): void;
  /** Tell a user's browsers why and drop them (deactivated, role changed), on whichever server process they are. */
  disconnectUser(userId: number, reason: SessionEndReason): void;
  /** Re-read the users behind this process's browser sockets; drop those deactivated or whose role changed. */
  revalidateSessions(): Promise<number>;
  close(): Promise<void>;
}

export interface RealtimeOptions {
  /** Where finished streams are stored; defaults to storeCaptureAndQueue of server/captures/ingest.ts. */
  storeCapture?: StoreCaptureFn;
  /** How often the adapter tells the other server processes it is alive (socket.io default 5 s; tests use less). */
  heartbeatIntervalMs?: number;
}

export async function attachRealtime(ctx: AppContext, httpServer: http.Server, opts: RealtimeOptions = {}): Promise<Realtime> {
  const log = pino({ name: "realtime", level: ctx.config.env === "test" ? "silent" : "info" });
  // Its own small pool: the adapter and the LISTEN bridge each hold one connection for as long as the server runs,
  // which must not starve the knex pool that serves requests.
  const pool = new pg.Pool({ connectionString: ctx.config.databaseUrl, max: 4 });
  pool.on("error", (err) => log.warn({ err }, "idle realtime database connection failed"));

  const io = new Server(httpServer, {
    serveClient: false,
    // Gateway chunks travel as binary attachments; leave room for the message around the largest chunk.
    maxHttpBufferSize: MAX_CHUNK_BYTES + 64 * 1024,
    adapter: createAdapter(pool, {
      errorHandler: (err) => log.warn({ err }, "socket.io adapter error"),
      ...(opts.heartbeatIntervalMs ? { heartbeatInterval: opts.heartbeatIntervalMs, heartbeatTimeout: opts.heartbeatIntervalMs * 4 } : {}),
    }),
  });

  io.use(async (socket, next) => {
    try {
      const token = tokenFromCookieHeader(socket.handshake.headers.cookie);
      const user = await userFromToken(ctx.db, ctx.config, token);
      if (!user) return next(new Error("unauthorized"));
      const exp = (jwt.decode(token!) as jwt.JwtPayload | null)?.exp;
      Object.assign(socket.data as BrowserSocketData, { user, expiresAt: typeof exp === "number" ? exp * 1000 : Infinity });
      next();
    } catch (err) {
      next(err as Error);
    }
  });

  // Close a browser socket, telling it why first. The reason is emitted before the disconnect on the same
  // connection, so it arrives; anything emitted after is dropped (the connection is closing).
  const endSession = (socket: Socket, reason: SessionEndReason) => {
    const data = socket.data as BrowserSocketData;
    if (data.ended) return;
    data.ended = true;
    socket.emit("session:ended", { reason, message: SESSION_END_MESSAGE[reason] });
    socket.disconnect(true);
  };
  io.on("connection", (socket: Socket) => {
    const data = socket.data as BrowserSocketData;
    void socket.join([roleRoom(data.user.role), userRoom(data.user.id)]);
    // Checked on every delivery (a number comparison, no database): an expired session receives nothing more. The
    // outgoing listener runs before the packet is written; closing the connection here drops the packet.
    socket.onAnyOutgoing((event) => {
      if (!data.ended && event !== "session:ended" && Date.now() >= data.expiresAt) endSession(socket, "expired");
    });
    // An idle socket is closed at expiry too.
    if (Number.isFinite(data.expiresAt)) {
      const timer = setTimeout(() => endSession(socket, "expired"), Math.min(Math.max(0, data.expiresAt - Date.now()), 2 ** 31 - 1));
      socket.once("disconnect", () => clearTimeout(timer));
    }
  });
  // Deactivation and role changes arrive through disconnectUser (the users route); this also catches changes made
  // outside the API, or a broadcast this process missed: one query per interval for all of its browser sockets.
  const revalidateSessions = async (): Promise<number> => {
    const sockets = [...io.of("/").sockets.values()].filter((s) => !(s.data as BrowserSocketData).ended);
    if (!sockets.length) return 0;
    const ids = [...new Set(sockets.map((s) => (s.data as BrowserSocketData).user.id))];
    const rows: { id: number; role: string; active: boolean }[] = await ctx.db("users").whereIn("id", ids).select("id", "role", "active");
    const byId = new Map(rows.map((r) => [r.id, r]));
    let dropped = 0;
    for (const s of sockets) {
      const { user } = s.data as BrowserSocketData;
      const now = byId.get(user.id);
      if (!now || !now.active) endSession(s, "deactivated");
      else if (now.role !== user.role) endSession(s, "role-changed");
      else continue;
      dropped++;
    }
    return dropped;
  };
  const revalidator = setInterval(() => void revalidateSessions().catch((err) => log.warn({ err }, "session revalidation failed")), REVALIDATE_MS);
  revalidator.unref();
  const dropUser = (userId: number, reason: SessionEndReason) => {
    for (const s of io.of("/").sockets.values()) if ((s.data as BrowserSocketData).user?.id === userId) endSession(s, reason);
  };
  io.of("/").on(USER_ENDED, (msg: { userId?: unknown; reason?: unknown }) => {
    if (typeof msg?.userId === "number" && typeof msg.reason === "string" && msg.reason in SESSION_END_MESSAGE) dropUser(msg.userId, msg.reason as SessionEndReason);
  });

  const resolveStore = async (): Promise<StoreCaptureFn> => {
    if (opts.storeCapture) return opts.storeCapture;
    // Loaded on first stream end: the pipeline (blob store, job queue) is not needed to serve live updates.
    const { storeCaptureAndQueue } = await import("./captures/ingest.ts");
    return storeCaptureAndQueue;
  };
  const gatewayNs = attachGatewayNamespace(io, ctx, resolveStore);
  const gateways = gatewayNs.nsp;
  // Each server drops the revoked gateway's sockets itself, telling them why first. (A room-wide emit through the
  // adapter is sent only after its NOTIFY round trip, so it would arrive after a room-wide disconnect: the device
  // would never see the reason.)
  const dropGateway = (gatewayId: number, message: string) => {
    const local = gateways.local.in(gatewayRoom(gatewayId));
    local.emit("stream:error", { code: "revoked", message });
    local.disconnectSockets(true);
  };
  gateways.on(GATEWAY_REVOKED, (msg: { gatewayId?: unknown; message?: unknown }) => {
    if (typeof msg?.gatewayId === "number") dropGateway(msg.gatewayId, String(msg.message ?? "This gateway's token was revoked."));
  });

  const listener = await listenForEvents(pool, (event, payload) => {
    const permission = audienceOf(event);
    if (!permission) return log.warn({ event }, "event with no audience in EVENT_AUDIENCE; not delivered");
    io.local.to(roomsFor(permission)).emit(event, payload);
  }, log);

  return {
    io,
    publish(event, payload) {
      const permission = audienceOf(event);
      if (!permission) return log.warn({ event }, "event with no audience in EVENT_AUDIENCE; not delivered");
      io.to(roomsFor(permission)).emit(event, payload);
    },
    disconnectGateway(gatewayId, message) {
      dropGateway(gatewayId, message);
      gateways.serverSideEmit(GATEWAY_REVOKED, { gatewayId, message });
    },
    disconnectUser(userId, reason) {
      // Like gateways: each server drops its own sockets, so the reason is sent before the disconnect.
      dropUser(userId, reason);
      io.of("/").serverSideEmit(USER_ENDED, { userId, reason });
    },
    revalidateSessions,
    async close() {
      clearInterval(revalidator);
      gatewayNs.close();
      await listener.close();
      // Closes every namespace's adapter (releasing its LISTEN connection) and the engine; it also closes the
      // http server, which startServer's own close then finds already closed.
      await new Promise<void>((resolve) => io.close(() => resolve()));
      await pool.end();
    },
  };
}

/** LISTEN barhound_events on a dedicated connection, reconnecting after a database restart. */
async function listenForEvents(pool: pg.Pool, onEvent: (event: string, payload: unknown) => void, log: { warn: (o: object, m: string) => void }) {
  let client: pg.PoolClient | null = null;
  let closed = false;
  let retry: NodeJS.Timeout | undefined;

  const connect = async () => {
    const c = await pool.connect();
    c.on("notification", (msg) => {
      if (msg.channel !== EVENTS_CHANNEL || !msg.payload) return;
      try {
        const { event, payload } = JSON.parse(msg.payload) as { event?: unknown; payload?: unknown };
        if (typeof event === "string") onEvent(event, payload);
      } catch (err) {
        log.warn({ err }, "unreadable barhound_events notification");
      }
    });
    c.on("error", (err) => {
      log.warn({ err }, "LISTEN connection lost; reconnecting");
      c.release(err);
      if (client === c) client = null;
      schedule();
    });
    await c.query(`LISTEN ${EVENTS_CHANNEL}`);
    client = c;
  };
  const schedule = () => {
    if (closed) return;
    retry = setTimeout(() => connect().catch((err) => (log.warn({ err }, "LISTEN reconnect failed"), schedule())), 2000);
  };

  await connect();
  return {
    async close() {
      closed = true;
      clearTimeout(retry);
      if (client) {
        const c = client;
        client = null;
        await c.query(`UNLISTEN ${EVENTS_CHANNEL}`).catch(() => {});
        c.release();
      }
    },
  };
}

/**
 * Wire live updates into a server: sets ctx.services.publish, ctx.services.disconnectGateway and
 * ctx.services.disconnectUser, and registers the
 * onHttpServer hook (attach socket.io) and the onClose closer that startServer runs. Until a socket server is
 * attached (e.g. a process that only serves HTTP in tests), publish falls back to NOTIFY so other servers' browsers
 * still hear the event.
 */
export function installRealtime(ctx: AppContext, opts: RealtimeOptions = {}): void {
  let rt: Realtime | null = null;
  ctx.services.publish = (event: string, payload: unknown) => {
    if (rt) rt.publish(event, payload);
    else void notifyEvent(ctx.db, event, payload).catch(() => {});
  };
  ctx.services.disconnectGateway = (gatewayId: number, message: string) => rt?.disconnectGateway(gatewayId, message);
  ctx.services.disconnectUser = (userId: number, reason: SessionEndReason) => rt?.disconnectUser(userId, reason);
  ctx.services.onHttpServer ??= [];
  (ctx.services.onHttpServer as ((s: http.Server) => Promise<void> | void)[]).push(async (server) => {
    rt = await attachRealtime(ctx, server, opts);
    ctx.services.realtime = rt;
  });
  ctx.services.onClose ??= [];
  (ctx.services.onClose as (() => Promise<void>)[]).push(async () => {
    const r = rt;
    rt = null;
    await r?.close();
  });
}

export { GATEWAY_NAMESPACE };
