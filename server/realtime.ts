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
  "inspection:changed": "fleet.read",
  "review:": "review.read",
};

export function audienceOf(event: string): Permission | null {
  if (EVENT_AUDIENCE[event]) return EVENT_AUDIENCE[event];
  const prefix = event.includes(":") ? event.slice(0, event.indexOf(":") + 1) : "";
  return prefix && EVENT_AUDIENCE[prefix] ? EVENT_AUDIENCE[prefix] : null;
}

/** Server-to-server message (through the adapter): drop the sockets of a revoked gateway. */
const GATEWAY_REVOKED = "gateway:revoked";

export const roleRoom = (role: string) => `role:${role}`;
export const userRoom = (id: number) => `user:${id}`;
const roomsFor = (permission: Permission) => ROLES.filter((r) => can(r, permission)).map(roleRoom);

export interface Realtime {
  io: Server;
  /** Send an event raised in this process to every allowed browser on every server process. */
  publish(event: string, payload: unknown): void;
  /** Tell a gateway its token was revoked and drop its connections, on whichever server process they are. */
  disconnectGateway(gatewayId: number, message: string): void;
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
      const user = await userFromToken(ctx.db, ctx.config, tokenFromCookieHeader(socket.handshake.headers.cookie));
      if (!user) return next(new Error("unauthorized"));
      (socket.data as { user?: SessionUser }).user = user;
      next();
    } catch (err) {
      next(err as Error);
    }
  });
  io.on("connection", (socket: Socket) => {
    const user = (socket.data as { user: SessionUser }).user;
    void socket.join([roleRoom(user.role), userRoom(user.id)]);
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
    async close() {
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
 * Wire live updates into a server: sets ctx.services.publish and ctx.services.disconnectGateway, and registers the
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
