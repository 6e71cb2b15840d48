import { describe, expect, it } from "vitest";
import { z } from "zod";
import { ApiError, apiUrl, errorFromBody, toQueryString } from "../../src/lib/api.ts";
import { formLevelMessage, serverFieldErrors, validate } from "../../src/lib/forms.ts";
import { signInSchema, setPasswordSchema } from "../../src/features/auth/schemas.ts";
import { inviteSchema, gatewaySchema, siteSchema } from "../../src/features/admin/schemas.ts";
import { shouldRetry } from "../../src/lib/query.ts";
import { safeNext, landingPath } from "../../src/lib/session.ts";

describe("api client helpers", () => {
  it("builds /api URLs and drops empty query values", () => {
    expect(apiUrl("/captures", { page: 2, q: "", mine: true, status: undefined })).toBe("/api/captures?page=2&mine=1");
    expect(apiUrl("/api/inspections.csv")).toBe("/api/inspections.csv");
    expect(toQueryString({ status: ["planned", "done"] })).toBe("status=planned&status=done");
  });
  it("turns the server's error body into an ApiError with fields", () => {
    const e = errorFromBody(400, { error: "Invalid request", code: "bad-request", fields: { email: "Enter a valid e-mail address." } });
    expect(e).toBeInstanceOf(ApiError);
    expect(e.status).toBe(400);
    expect(e.fields).toEqual({ email: "Enter a valid e-mail address." });
    expect(errorFromBody(413, "<html>too big</html>").message).toBe("The file is larger than the server accepts.");
    expect(errorFromBody(502, undefined).message).toBe("Something went wrong on the server.");
  });
  it("retries only network and server failures", () => {
    expect(shouldRetry(0, new ApiError(404, "x"))).toBe(false);
    expect(shouldRetry(0, new ApiError(503, "x"))).toBe(true);
    expect(shouldRetry(2, new ApiError(503, "x"))).toBe(false);
  });
});

describe("form helpers", () => {
  it("validate returns field messages by path", () => {
    const r = validate(signInSchema, { email: "nope", password: "" });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors).toEqual({ email: "Enter a valid e-mail address.", password: "Enter your password." });
  });
  it("takes the server's 400 fields, and gives a form message only for fields the form does not show", () => {
    const err = new ApiError(400, "Invalid request", { fields: { email: "Taken.", token: "Expired." } });
    expect(serverFieldErrors(err)).toEqual({ email: "Taken.", token: "Expired." });
    expect(formLevelMessage(err, ["email"])).toBe("Invalid request: Expired.");
    expect(formLevelMessage(new ApiError(400, "Invalid request", { fields: { email: "Taken." } }), ["email"])).toBeNull();
    expect(formLevelMessage(new ApiError(409, "A user with this e-mail already exists."), ["email"])).toBe("A user with this e-mail already exists.");
  });
  it("set-password needs 10+ characters and the same twice", () => {
    expect(validate(setPasswordSchema, { password: "short", confirm: "short" })).toMatchObject({ ok: false, errors: { password: "Use at least 10 characters." } });
    expect(validate(setPasswordSchema, { password: "long-enough-1", confirm: "long-enough-2" })).toMatchObject({ ok: false, errors: { confirm: "The two passwords differ." } });
    expect(validate(setPasswordSchema, { password: "long-enough-1", confirm: "long-enough-1" }).ok).toBe(true);
  });
  it("admin schemas", () => {
    expect(validate(inviteSchema, { email: "a@b.example", name: " Ana ", role: "planner" })).toEqual({ ok: true, data: { email: "a@b.example", name: "Ana", role: "planner" } });
    expect(validate(inviteSchema, { email: "a@b.example", name: "Ana", role: "boss" }).ok).toBe(false);
    expect(validate(siteSchema, { code: "N 1", name: "North", timezone: "UTC" })).toMatchObject({ ok: false, errors: { code: "Letters, digits, - and _ only." } });
    expect(validate(gatewaySchema, { name: "Panel", siteId: "" })).toMatchObject({ ok: false, errors: { siteId: "Pick a site." } });
    expect(validate(gatewaySchema, { name: "Panel", siteId: "3" })).toEqual({ ok: true, data: { name: "Panel", siteId: 3 } });
  });
  it("a zod form-level issue lands under _", () => {
    const s = z.object({ a: z.string() }).refine(() => false, "Whole form is wrong.");
    expect(validate(s, { a: "x" })).toEqual({ ok: false, errors: { _: "Whole form is wrong." } });
  });
});

describe("session helpers", () => {
  it("only follows same-app next paths", () => {
    expect(safeNext("/plan?view=month")).toBe("/plan?view=month");
    expect(safeNext("//evil.example")).toBeNull();
    expect(safeNext("https://evil.example")).toBeNull();
    expect(safeNext("/sign-in")).toBeNull();
  });
  it("lands each role on its start screen", () => {
    const me = (role: "technician" | "analyst" | "planner" | "manager" | "admin") => ({ user: { id: 1, email: "", name: "", role }, permissions: [] });
    expect([landingPath(me("technician")), landingPath(me("analyst")), landingPath(me("planner")), landingPath(me("manager")), landingPath(me("admin"))]).toEqual([
      "/my-work",
      "/review",
      "/plan",
      "/fleet",
      "/admin",
    ]);
    expect(landingPath(null)).toBe("/sign-in");
  });
});
