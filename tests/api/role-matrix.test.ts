import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { signedIn } from "../helpers/context.ts";
import { makePipelineEnv, type PipelineEnv } from "../helpers/pipeline.ts";
import { routeRegistry } from "../../server/http.ts";
import { can, ROLES, type Role } from "../../server/permissions.ts";

// For every API route the permission module names, each role gets what the matrix says: a role without the
// permission gets 403 with a JSON error; one with it gets past the check (a 2xx, or a 400/404/409/422 about
// the dummy request); no session gets 401.
let env: PipelineEnv; // the app as production assembles it: blob store and job queue included
const agents = {} as Record<Role, request.Agent>;

beforeAll(async () => {
  env = await makePipelineEnv({ loginRateLimit: 1000 });
  for (const role of ROLES) agents[role] = await signedIn(env.app, role);
});
afterAll(async () => env.close());

const concrete = (path: string) => path.replace(/:(\w+)/g, (_m, name: string) => (name === "token" ? "not-a-token" : "999999"));

function send(agent: request.Agent | ReturnType<typeof request>, method: string, path: string) {
  const r = (agent as unknown as Record<string, (p: string) => request.Test>)[method](concrete(path));
  return method === "get" || method === "delete" ? r : r.send({});
}

describe("role × route matrix", () => {
  it("covers the routes of every module", () => {
    expect(routeRegistry.length).toBeGreaterThan(10);
    expect(routeRegistry.filter((r) => r.permission !== "public").length).toBeGreaterThan(8);
  });

  it("answers 401 without a session on every guarded route", async () => {
    for (const route of routeRegistry.filter((r) => r.permission !== "public")) {
      const res = await send(request(env.app), route.method, route.path);
      expect(res.status, `${route.method.toUpperCase()} ${route.path}`).toBe(401);
    }
  });

  for (const role of ROLES) {
    it(`gives ${role} exactly what the permission module says`, async () => {
      for (const route of routeRegistry.filter((r) => r.permission !== "public")) {
        if (route.path === "/api/auth/logout") continue;
        const res = await send(agents[role], route.method, route.path);
        const label = `${role} ${route.method.toUpperCase()} ${route.path} (${route.permission})`;
        if (can(role, route.permission as Parameters<typeof can>[1])) {
          expect([401, 403], label).not.toContain(res.status);
          expect(res.status, label).toBeLessThan(500);
          if (route.method === "get" && !route.path.includes(":")) expect(res.status, label).toBe(200);
        } else {
          expect(res.status, label).toBe(403);
          expect(res.body.error, label).toBeTruthy();
        }
      }
    });
  }
});
