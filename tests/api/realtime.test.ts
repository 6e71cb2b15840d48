import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Socket } from "socket.io-client";
import { makeTestEnv, type TestEnv } from "../helpers/context.ts";
import { connectBrowser, nextEvent, sessionCookie, sleep, startTestServer, type TestServer } from "../helpers/realtime.ts";
import { io as ioClient } from "socket.io-client";
import { notifyEvent } from "../../server/events.ts";
import { createGatewayToken } from "../../server/gateway/tokens.ts";
import type { Realtime } from "../../server/realtime.ts";
import jwt from "jsonwebtoken";
import { signedIn } from "../helpers/context.ts";
import { SESSION_COOKIE, signSession } from "../../server/auth.ts";

// Two "server processes" on one database: each has its own app, knex pool, socket.io server and adapter.
let envA: TestEnv;
let envB: TestEnv;
let serverA: TestServer;
let serverB: TestServer;
const sockets: Socket[] = [];
const track = (s: Socket) => (sockets.push(s), s);

beforeAll(async () => {
  envA = await makeTestEnv();
  envB = await makeTestEnv();
  serverA = await startTestServer(envA, { heartbeatIntervalMs: 200 });
  serverB = await startTestServer(envB, { heartbeatIntervalMs: 200 });
  // The adapters find each other by heartbeat over NOTIFY; once each counts two servers, both are listening.
  const until = Date.now() + 10_000;
  while ((await serverA.realtime.io.of("/").adapter.serverCount()) < 2 || (await serverB.realtime.io.of("/").adapter.serverCount()) < 2) {
    if (Date.now() > until) throw new Error("the two servers' adapters did not see each other");
    await sleep(50);
  }
});
afterAll(async () => {
  for (const s of sockets) s.close();
  await serverA?.close();
  await serverB?.close();
  await envA?.close();
  await envB?.close();
});

/** Count every arrival of an event on a socket. */
function counter(socket: Socket, event: string) {
  const seen: unknown[] = [];
  socket.on(event, (p) => seen.push(p));
  return seen;
}

async function until(check: () => boolean, ms = 5000) {
  const end = Date.now() + ms;
  while (!check()) {
    if (Date.now() > end) throw new Error("timed out");
    await sleep(20);
  }
}

describe("live updates", () => {
  it("a signed-in browser receives capture:status sent with notifyEvent (e.g. by the worker)", async () => {
    const socket = track(await connectBrowser(serverA.url, await sessionCookie(envA.app, "technician")));
    const got = nextEvent(socket, "capture:status");
    await notifyEvent(envA.db, "capture:status", { id: 41, assetId: 7, status: "analysing" });
    expect(await got).toEqual({ id: 41, assetId: 7, status: "analysing" });
  });

  it("refuses a client without a session cookie, or with a forged one", async () => {
    await expect(connectBrowser(serverA.url)).rejects.toThrow("unauthorized");
    await expect(connectBrowser(serverA.url, "bh_session=not-a-token")).rejects.toThrow("unauthorized");
  });

  it("sends review events only to roles that may read the review list", async () => {
    const analyst = track(await connectBrowser(serverA.url, await sessionCookie(envA.app, "analyst")));
    const tech = track(await connectBrowser(serverA.url, await sessionCookie(envA.app, "technician")));
    const techSeen = counter(tech, "review:changed");
    const got = nextEvent(analyst, "review:changed");
    serverA.realtime.publish("review:changed", { captureId: 3 });
    expect(await got).toEqual({ captureId: 3 });
    // A fleet event published right after reaches the technician, so the review event had its chance to arrive too.
    const fleet = nextEvent(tech, "finding:new");
    serverA.realtime.publish("finding:new", { id: 1, assetId: 2, kind: "rotor", level: "R3" });
    await fleet;
    expect(techSeen).toEqual([]);
  });

  it("an event published on server A reaches a client on server B exactly once", async () => {
    const onB = track(await connectBrowser(serverB.url, await sessionCookie(envB.app, "manager")));
    const onA = track(await connectBrowser(serverA.url, await sessionCookie(envA.app, "planner")));
    const seenB = counter(onB, "inspection:changed");
    const seenA = counter(onA, "inspection:changed");
    (serverA.realtime as Realtime).publish("inspection:changed", { id: 99 });
    await until(() => seenA.length >= 1 && seenB.length >= 1);
    await sleep(400); // give a duplicate time to show up
    expect(seenB).toEqual([{ id: 99 }]);
    expect(seenA).toEqual([{ id: 99 }]);
  });

  it("a NOTIFY from outside the servers reaches clients on both servers exactly once", async () => {
    const onB = track(await connectBrowser(serverB.url, await sessionCookie(envB.app, "analyst")));
    const onA = track(await connectBrowser(serverA.url, await sessionCookie(envA.app, "admin")));
    const seenB = counter(onB, "capture:status");
    const seenA = counter(onA, "capture:status");
    await notifyEvent(envB.db, "capture:status", { id: 5, assetId: 1, status: "failed", error: "too short" });
    await until(() => seenA.length >= 1 && seenB.length >= 1);
    await sleep(400);
    expect(seenA).toHaveLength(1);
    expect(seenB).toHaveLength(1);
  });

  it("ctx.services.publish is wired by installRealtime", async () => {
    const onB = track(await connectBrowser(serverB.url, await sessionCookie(envB.app, "technician")));
    const got = nextEvent(onB, "capture:status");
    (envA.ctx.services.publish as (e: string, p: unknown) => void)("capture:status", { id: 6, assetId: 1, status: "queued" });
    expect(await got).toMatchObject({ id: 6, status: "queued" });
  });

  it("revoking on server A drops the gateway's connection on server B, telling it why", async () => {
    const { token, prefix, hash } = createGatewayToken();
    const [gw] = await envA.db("gateways").insert({ name: "Cross-server gateway", token_prefix: prefix, token_hash: hash }).returning("id");
    const socket = track(ioClient(`${serverB.url}/gateway`, { auth: { token }, transports: ["websocket"], reconnection: false, forceNew: true }));
    await new Promise<void>((resolve, reject) => socket.once("connect", () => resolve()).once("connect_error", reject));
    const told = nextEvent(socket, "stream:error");
    const dropped = new Promise((resolve) => socket.once("disconnect", resolve));
    serverA.realtime.disconnectGateway(gw.id, "revoked for the test");
    expect(await told).toEqual({ code: "revoked", message: "revoked for the test" });
    expect(await dropped).toBe("io server disconnect");
  });
});

describe("sessions of browser sockets", () => {
  /** A fresh user (not a shared demo user) and a session cookie for them. */
  async function freshUser(role: "technician" | "analyst", expiresInS?: number) {
    const email = `rt-${Date.now().toString(36)}-${Math.floor(Math.random() * 1e6)}@example.test`;
    const [user] = await envA.db("users").insert({ email, name: `Realtime ${role}`, role, active: true }).returning(["id", "email", "name", "role"]);
    const token = expiresInS
      ? jwt.sign({ sub: String(user.id), role }, envA.config.jwtSecret, { algorithm: "HS256", expiresIn: expiresInS })
      : signSession(envA.config, user);
    return { user, cookie: `${SESSION_COOKIE}=${token}` };
  }
  const ended = (socket: Socket) =>
    Promise.all([nextEvent<{ reason: string; message: string }>(socket, "session:ended"), new Promise((resolve) => socket.once("disconnect", resolve))]);

  it("deactivating a user closes their sockets on every server, telling them why", async () => {
    const { user, cookie } = await freshUser("technician");
    const onA = track(await connectBrowser(serverA.url, cookie));
    const onB = track(await connectBrowser(serverB.url, cookie));
    const endA = ended(onA);
    const endB = ended(onB);
    const admin = await signedIn(envA.app, "admin");
    expect((await admin.patch(`/api/users/${user.id}`).send({ active: false })).status).toBe(200);
    for (const [told, reason] of [await endA, await endB]) {
      expect(told).toEqual({ reason: "deactivated", message: expect.stringMatching(/deactivated/) });
      expect(reason).toBe("io server disconnect");
    }
    // And the cookie no longer opens a socket.
    await expect(connectBrowser(serverB.url, cookie)).rejects.toThrow("unauthorized");
  });

  it("a role change closes the sockets; reconnecting joins the new role's rooms", async () => {
    const { user, cookie } = await freshUser("technician");
    const before = track(await connectBrowser(serverB.url, cookie));
    const end = ended(before);
    const admin = await signedIn(envA.app, "admin");
    expect((await admin.patch(`/api/users/${user.id}`).send({ role: "analyst" })).status).toBe(200);
    expect((await end)[0]).toMatchObject({ reason: "role-changed" });
    const after = track(await connectBrowser(serverB.url, cookie));
    const got = nextEvent(after, "review:changed");
    serverA.realtime.publish("review:changed", { captureId: 8 });
    expect(await got).toEqual({ captureId: 8 });
  });

  it("an expired session receives no more events: the socket is told and closed", async () => {
    const { cookie } = await freshUser("technician", 3);
    const socket = track(await connectBrowser(serverA.url, cookie));
    const seen = counter(socket, "capture:status");
    const got = nextEvent(socket, "capture:status");
    serverA.realtime.publish("capture:status", { id: 1, assetId: 1, status: "queued" });
    await got; // still valid: delivered
    const end = ended(socket);
    await sleep(3100);
    serverA.realtime.publish("capture:status", { id: 2, assetId: 1, status: "queued" });
    expect((await end)[0]).toMatchObject({ reason: "expired" });
    await sleep(200);
    expect(seen).toEqual([{ id: 1, assetId: 1, status: "queued" }]);
  });

  it("a deactivation made outside the API is caught by the periodic re-check", async () => {
    const { user, cookie } = await freshUser("analyst");
    const socket = track(await connectBrowser(serverA.url, cookie));
    const end = ended(socket);
    await envA.db("users").where({ id: user.id }).update({ active: false });
    expect(await serverA.realtime.revalidateSessions()).toBeGreaterThanOrEqual(1);
    expect((await end)[0]).toMatchObject({ reason: "deactivated" });
  });
});
