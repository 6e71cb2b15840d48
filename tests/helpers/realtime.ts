// Helpers for tests that need a real listening server: socket.io (live updates, gateway streams) on port 0.

import http from "node:http";
import request from "supertest";
import type { Knex } from "knex";
import { io as ioClient, type Socket } from "socket.io-client";
import { installRealtime, type Realtime, type RealtimeOptions } from "../../server/realtime.ts";
import { DEMO_PASSWORD } from "../../server/seed/demo-users.ts";
import type { Role } from "../../server/permissions.ts";
import { demoUser, type TestEnv } from "./context.ts";

export interface TestServer {
  url: string;
  realtime: Realtime;
  close(): Promise<void>;
}

/** Listen on a free port with socket.io attached the way startServer does it (installRealtime's hooks). */
export async function startTestServer(env: TestEnv, opts: RealtimeOptions = {}): Promise<TestServer> {
  installRealtime(env.ctx, opts);
  const server = http.createServer(env.app);
  for (const hook of env.ctx.services.onHttpServer as ((s: http.Server) => Promise<void> | void)[]) await hook(server);
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", () => resolve()));
  const port = (server.address() as { port: number }).port;
  return {
    url: `http://127.0.0.1:${port}`,
    realtime: env.ctx.services.realtime as Realtime,
    async close() {
      for (const c of env.ctx.services.onClose as (() => Promise<void>)[]) await c();
      server.closeAllConnections();
      await new Promise<void>((r) => server.close(() => r()));
    },
  };
}

/** "bh_session=…" for a signed-in demo user, to send as the Cookie header of a socket.io handshake. */
export async function sessionCookie(app: TestEnv["app"], role: Role): Promise<string> {
  const res = await request(app).post("/api/auth/login").send({ email: demoUser(role).email, password: DEMO_PASSWORD });
  if (res.status !== 200) throw new Error(`sign-in as ${role} failed: ${res.status}`);
  const set = ([] as string[]).concat(res.headers["set-cookie"] ?? []);
  const cookie = set.map((c) => c.split(";")[0]).find((c) => c.startsWith("bh_session="));
  if (!cookie) throw new Error("no session cookie in the sign-in answer");
  return cookie;
}

/** A browser-like socket.io client on the default namespace; resolves once connected. */
export function connectBrowser(url: string, cookie?: string): Promise<Socket> {
  const socket = ioClient(url, { transports: ["websocket"], reconnection: false, forceNew: true, ...(cookie ? { extraHeaders: { cookie } } : {}) });
  return new Promise((resolve, reject) => {
    socket.once("connect", () => resolve(socket));
    socket.once("connect_error", (err) => {
      socket.close();
      reject(err);
    });
  });
}

/** Resolve with the first `event` payload on a socket, or reject after `ms`. */
export function nextEvent<T = unknown>(socket: Socket, event: string, ms = 5000): Promise<T> {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => {
      socket.off(event, on);
      reject(new Error(`no "${event}" within ${ms} ms`));
    }, ms);
    const on = (payload: T) => {
      clearTimeout(timer);
      resolve(payload);
    };
    socket.once(event, on);
  });
}

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** A site with an area and a motor, unique per call; returns their ids. */
export async function insertMotor(db: Knex, label = "t"): Promise<{ siteId: number; areaId: number; assetId: number; pointId: number }> {
  const u = `${label}${Date.now().toString(36)}${Math.floor(Math.random() * 1e6).toString(36)}`.slice(0, 20);
  const [site] = await db("sites").insert({ code: u, name: `Site ${u}` }).returning("id");
  const [area] = await db("areas").insert({ site_id: site.id, name: "Pump house" }).returning("id");
  const [asset] = await db("assets")
    .insert({ area_id: area.id, tag: `M-${u}`, name: `Cooling water pump ${u}`, rated_rpm: 1475, poles: 4, rated_hz: 50, rated_kw: 55 })
    .returning("id");
  const [point] = await db("measurement_points").insert({ asset_id: asset.id, name: "Ia", kind: "current", position: "A", unit: "A" }).returning("id");
  return { siteId: site.id, areaId: area.id, assetId: asset.id, pointId: point.id };
}
