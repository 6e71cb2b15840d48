// The forms validate with the server's own request schemas (src/shared/schemas/): the same sample, entered in a
// form (strings, as inputs give them) or sent as JSON, is accepted or refused alike, on the same fields.
import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import type { z } from "zod";
import { forgotSchema, setPasswordSchema, signInSchema } from "../../src/features/auth/schemas.ts";
import { areaSchema, gatewaySchema, inviteSchema, siteSchema } from "../../src/features/admin/schemas.ts";
import { verdictSchema } from "../../src/features/spectrum/api/post-verdict.ts";
import { calculatorSchema, EXAMPLE } from "../../src/features/calculator/api/evaluate.ts";
import { completeSchema, scheduleSchema, todayIso } from "../../src/lib/inspections.ts";
import { forgotBody, loginBody, setPasswordBody } from "../../src/shared/schemas/auth.ts";
import { inviteBody } from "../../src/shared/schemas/users.ts";
import { areaBody, siteBody, sitePatchBody } from "../../src/shared/schemas/sites.ts";
import { assetBody, assetFields, assetPatchBody, moveMotorBody } from "../../src/shared/schemas/assets.ts";
import { pointBody, pointPatchBody } from "../../src/shared/schemas/points.ts";
import { motorFormSchema, motorFormValues } from "../../src/lib/motor-form.ts";
import { pointFormSchema } from "../../src/features/motor/lib/point-form.ts";
import { moveMotorSchema } from "../../src/features/motor/api/move-motor.ts";
import { gatewayBody } from "../../src/shared/schemas/gateways.ts";
import { completeBody, earliestToday, inspectionPatchBody, isPastDueDate, scheduleBody } from "../../src/shared/schemas/inspections.ts";
import { verdictBody } from "../../src/shared/schemas/findings.ts";
import { flatEvaluateBody } from "../../src/shared/schemas/motor-model.ts";

type Outcome = { ok: boolean; paths: string[] };
const outcome = (schema: z.ZodType, value: unknown): Outcome => {
  const r = schema.safeParse(value);
  return { ok: r.success, paths: r.success ? [] : [...new Set(r.error.issues.map((i) => (i.path.length ? i.path.join(".") : "_")))].sort() };
};
/** The form's verdict on what a person typed, and the server's on the JSON body that stands for it. */
function same(form: z.ZodType, server: z.ZodType, cases: { form: Record<string, unknown>; body: unknown; ok: boolean }[]) {
  for (const c of cases) {
    const f = outcome(form, c.form);
    const s = outcome(server, c.body);
    expect({ case: c.form, ...f }).toEqual({ case: c.form, ...s });
    expect(f.ok).toBe(c.ok);
    // What a valid form sends, the server takes.
    if (f.ok) expect(outcome(server, form.parse(c.form))).toEqual({ ok: true, paths: [] });
  }
}

const addDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10);

describe("forms and API share their request schemas", () => {
  it("schedule an inspection", () => {
    const form = { assetId: "4", findingId: "", title: "Inspect M-12", instructions: "", dueDate: addDays(14), assigneeId: "7", priority: "high" };
    const body = { assetId: 4, title: "Inspect M-12", instructions: "", dueDate: addDays(14), assigneeId: 7, priority: "high" };
    same(scheduleSchema, scheduleBody, [
      { form, body, ok: true },
      { form: { ...form, findingId: "12", dueDate: todayIso() }, body: { ...body, findingId: 12, dueDate: todayIso() }, ok: true },
      { form: { ...form, assetId: "", assigneeId: "", title: " ", dueDate: "2000-01-01" }, body: { title: " ", instructions: "", dueDate: "2000-01-01", priority: "high" }, ok: false },
      { form: { ...form, dueDate: "2026-02-30", priority: "asap" }, body: { ...body, dueDate: "2026-02-30", priority: "asap" }, ok: false },
      { form: { ...form, dueDate: "" }, body: { ...body, dueDate: "" }, ok: false },
      { form: { ...form, title: "x".repeat(201), assetId: "abc" }, body: { ...body, title: "x".repeat(201), assetId: "abc" }, ok: false },
    ]);
    expect(outcome(scheduleBody, { ...body, dueDate: "2000-01-01" }).paths).toEqual(["dueDate"]);
  });

  it("a past due date: refused on scheduling and on a move, by the server's clock for every time zone", () => {
    const now = Date.parse("2026-03-10T05:00:00Z"); // still 9 March in UTC−12
    expect(earliestToday(now)).toBe("2026-03-09");
    expect([isPastDueDate("2026-03-08", now), isPastDueDate("2026-03-09", now), isPastDueDate("2026-03-10", now)]).toEqual([true, false, false]);
    expect(earliestToday(Date.parse("2026-03-10T13:00:00Z"))).toBe("2026-03-10");
    // Today where the planner is is never refused by the server.
    expect(isPastDueDate(todayIso())).toBe(false);
    // The PATCH schema takes any date; the route refuses one only when it moves into the past (tests/api/inspections).
    expect(outcome(inspectionPatchBody, { dueDate: "2000-01-01" }).ok).toBe(true);
  });

  it("complete an inspection", () => {
    const server = { safeParse: (b: unknown) => { const p = inspectionPatchBody.safeParse(b); return p.success ? completeBody.safeParse(p.data) : p; } } as unknown as z.ZodType;
    const c = (form: Record<string, unknown>) => outcome(completeSchema, form);
    expect(c({ outcome: "", completionNote: "" })).toEqual(outcome(server, { status: "done" }));
    expect(c({ outcome: "", completionNote: "" }).paths).toEqual(["completionNote", "outcome"]);
    expect(c({ outcome: "repaired", completionNote: " " })).toEqual(outcome(server, { status: "done", outcome: "repaired", completionNote: " " }));
    expect(c({ outcome: "repaired", completionNote: "Tightened terminal" })).toEqual(outcome(server, { status: "done", outcome: "repaired", completionNote: "Tightened terminal" }));
    expect(c({ outcome: "fixed", completionNote: "ok" })).toEqual(outcome(server, { status: "done", outcome: "fixed", completionNote: "ok" }));
  });

  it("sign in, forgot password, set password", () => {
    same(signInSchema, loginBody, [
      { form: { email: "nope", password: "" }, body: { email: "nope", password: "" }, ok: false },
      { form: { email: "ana@example.com", password: "x" }, body: { email: "ana@example.com", password: "x" }, ok: true },
    ]);
    same(forgotSchema, forgotBody, [
      { form: { email: "" }, body: {}, ok: false },
      { form: { email: "ana@example.com" }, body: { email: "ana@example.com" }, ok: true },
    ]);
    const token = "t".repeat(40);
    const pw = (password: string) => ({ form: outcome(setPasswordSchema, { password, confirm: password }), server: outcome(setPasswordBody, { token, password }) });
    for (const p of ["short", "long-enough-1", "x".repeat(201)]) expect(pw(p).form).toEqual(pw(p).server);
  });

  it("invite, site, area, gateway", () => {
    same(inviteSchema, inviteBody, [
      { form: { email: "a@b.example", name: " Ana ", role: "planner" }, body: { email: "a@b.example", name: " Ana ", role: "planner" }, ok: true },
      { form: { email: "a@b", name: "", role: "boss" }, body: { email: "a@b", role: "boss" }, ok: false },
    ]);
    same(siteSchema, siteBody, [
      { form: { code: "N-1", name: "North", timezone: "Europe/Berlin" }, body: { code: "N-1", name: "North", timezone: "Europe/Berlin" }, ok: true },
      { form: { code: "x y", name: "", timezone: "Mars/Base" }, body: { code: "x y", name: "", timezone: "Mars/Base" }, ok: false },
      { form: { code: "N1", name: "North", timezone: "" }, body: { code: "N1", name: "North", timezone: "" }, ok: false },
    ]);
    same(areaSchema, areaBody, [
      { form: { name: " " }, body: { name: " " }, ok: false },
      { form: { name: "Boiler house" }, body: { name: "Boiler house" }, ok: true },
    ]);
    same(gatewaySchema, gatewayBody, [
      { form: { name: "Panel", siteId: "3" }, body: { name: "Panel", siteId: 3 }, ok: true },
      { form: { name: "", siteId: "" }, body: { name: "" }, ok: false },
      { form: { name: "Panel", siteId: "0" }, body: { name: "Panel", siteId: 0 }, ok: false },
    ]);
  });

  it("edit a site: a field left out stays as it is (no default time zone on an edit)", () => {
    expect(sitePatchBody.parse({ name: "East works" })).toEqual({ name: "East works" });
    expect(sitePatchBody.parse({})).toEqual({});
    expect(siteBody.parse({ code: "E1", name: "East" }).timezone).toBe("UTC");
    expect(outcome(sitePatchBody, { timezone: "Mars/Base" })).toEqual({ ok: false, paths: ["timezone"] });
  });

  it("move a motor to another area: the motor page's form and PATCH /assets/:id share the area rule", () => {
    same(moveMotorSchema, moveMotorBody, [
      { form: { siteId: "2", areaId: "7" }, body: { areaId: 7 }, ok: true },
      { form: { siteId: "2", areaId: "" }, body: {}, ok: false },
      { form: { siteId: "2", areaId: "0" }, body: { areaId: 0 }, ok: false },
      { form: { siteId: "2", areaId: "1.5" }, body: { areaId: 1.5 }, ok: false },
    ]);
    expect(moveMotorSchema.safeParse({ areaId: "" }).error?.issues[0].message).toBe("Choose an area");
    // The full motor body takes the same rule, so a move is refused on the same words.
    expect(assetFields.areaId.safeParse(undefined).error?.issues[0].message).toBe("Choose an area");
  });

  it("add or edit a motor: the register's and the motor page's form and POST/PATCH /assets share the nameplate rules", () => {
    const form = {
      ...motorFormValues(null),
      tag: "TWT-HLP-P09", name: "High-lift pump 9", siteId: "3", areaId: "12", criticality: "high",
      ratedKw: "75", ratedVoltage: "400", ratedCurrent: "132", ratedHz: "50", ratedRpm: "1482", poles: "4", rotorBars: "40",
      designLetter: "b", efficiencyPct: "95,4", powerFactor: "0.86", connection: "delta", driveFed: true,
    };
    const body = {
      tag: "TWT-HLP-P09", name: "High-lift pump 9", areaId: 12, drivenEquipment: "pump", criticality: "high",
      ratedKw: 75, ratedVoltage: 400, ratedCurrent: 132, ratedHz: 50, ratedRpm: 1482, poles: 4, rotorBars: 40,
      designLetter: "b", efficiencyPct: 95.4, powerFactor: 0.86, connection: "delta", driveFed: true, machineGroup: 2, support: "rigid",
    };
    same(motorFormSchema, assetBody, [
      { form, body, ok: true },
      // poles 3, a speed at synchronous, a power factor above 1, an unknown design letter
      { form: { ...form, poles: "3" }, body: { ...body, poles: 3 }, ok: false },
      { form: { ...form, ratedRpm: "1500" }, body: { ...body, ratedRpm: 1500 }, ok: false },
      { form: { ...form, powerFactor: "1.2", designLetter: "N" }, body: { ...body, powerFactor: 1.2, designLetter: "N" }, ok: false },
      { form: { ...form, tag: " ", areaId: "", ratedRpm: "", poles: "" }, body: { ...body, tag: " ", areaId: undefined, ratedRpm: undefined, poles: undefined }, ok: false },
      { form: { ...form, ratedKw: "lots", rotorBars: "40.5", ratedHz: "0" }, body: { ...body, ratedKw: "lots", rotorBars: 40.5, ratedHz: 0 }, ok: false },
      // optional nameplate fields left empty are not given
      { form: { ...form, ratedKw: "", ratedCurrent: "", designLetter: "", connection: "" }, body: { ...body, ratedKw: undefined, ratedCurrent: undefined, designLetter: undefined, connection: undefined }, ok: true },
    ]);
    // The words under the field are the server's.
    const err = (f: Record<string, unknown>) => Object.fromEntries((motorFormSchema.safeParse(f).error?.issues ?? []).map((i) => [i.path.join("."), i.message]));
    expect(err({ ...form, poles: "3" })).toEqual({ poles: "Poles must be an even number (2, 4, 6, …)" });
    expect(err({ ...form, ratedRpm: "1500" })).toEqual({ ratedRpm: "Full-load speed must be below the synchronous 1500 rpm of a 4-pole motor at 50 Hz" });
    expect(err({ ...form, ratedRpm: "" }).ratedRpm).toBe("Give the full-load speed in rpm, as on the nameplate");
    expect(motorFormSchema.parse(form).designLetter).toBe("B");
    // An edit sends only what changed, with the same field rules; a field left out is not reset to a default.
    expect(assetPatchBody.parse({ name: "Pump 9" })).toEqual({ name: "Pump 9" });
    expect(assetPatchBody.parse({ ratedKw: null, connection: null })).toEqual({ ratedKw: null, connection: null });
    expect(outcome(assetPatchBody, { poles: 5, machineGroup: 3, support: "soft" })).toEqual({ ok: false, paths: ["machineGroup", "poles", "support"] });
  });

  it("add or edit a measurement point: the motor page's form and POST /assets/:id/points, PATCH /points/:id", () => {
    const form = { name: "Phase A current", kind: "current", position: "A", ctRatio: "100", sensitivity: "", unit: "A" };
    const body = { name: "Phase A current", kind: "current", position: "A", ctRatio: 100, unit: "A" };
    same(pointFormSchema, pointBody, [
      { form, body, ok: true },
      { form: { ...form, name: "", kind: "pressure" }, body: { ...body, name: "", kind: "pressure" }, ok: false },
      { form: { ...form, ctRatio: "0" }, body: { ...body, ctRatio: 0 }, ok: false },
      { form: { ...form, ctRatio: "1:100" }, body: { ...body, ctRatio: "1:100" }, ok: false },
      { form: { ...form, kind: "vibration", position: "H", ctRatio: "", sensitivity: "-5", unit: "m/s2" }, body: { ...body, kind: "vibration", position: "H", ctRatio: undefined, sensitivity: -5, unit: "m/s2" }, ok: false },
      { form: { ...form, position: "", unit: "" }, body: { ...body, position: undefined, unit: undefined }, ok: true },
    ]);
    // What the form sends an edit takes too.
    expect(outcome(pointPatchBody, pointFormSchema.parse(form))).toEqual({ ok: true, paths: [] });
    expect(pointFormSchema.safeParse({ ...form, ctRatio: "0" }).error?.issues[0].message).toBe("The CT ratio must be above 0");
  });

  it("verdict: the same rules, and the form alone asks for a note when dismissing or asking for a re-measure", () => {
    same(verdictSchema, verdictBody, [
      { form: { verdict: "maybe", note: "" }, body: { verdict: "maybe" }, ok: false },
      { form: { verdict: "confirmed", note: "" }, body: { verdict: "confirmed" }, ok: true },
      { form: { verdict: "dismissed", note: "Load swung." }, body: { verdict: "dismissed", note: "Load swung." }, ok: true },
      { form: { verdict: "remeasure", note: "x".repeat(4001) }, body: { verdict: "remeasure", note: "x".repeat(4001) }, ok: false },
    ]);
    expect(outcome(verdictSchema, { verdict: "dismissed", note: " " })).toEqual({ ok: false, paths: ["note"] });
    expect(outcome(verdictBody, { verdict: "dismissed" }).ok).toBe(true);
  });

  it("motor-model calculator and POST /motor-model/evaluate", () => {
    const body = Object.fromEntries(Object.entries(EXAMPLE).flatMap(([k, v]) => (v === "" ? [] : [[k, k === "connection" ? v : Number(v)]])));
    const { r2: _r2, ...noR2Form } = EXAMPLE;
    const { r2: _b2, ...noR2Body } = body;
    same(calculatorSchema, flatEvaluateBody, [
      { form: EXAMPLE, body, ok: true },
      { form: { ...noR2Form, r2: "", connection: "wye", poles: "3", slip: "5" }, body: { ...noR2Body, connection: "wye", poles: 3, slip: 5 }, ok: false },
      { form: { ...EXAMPLE, xm: "-1", lineVoltage: "abc" }, body: { ...body, xm: -1, lineVoltage: "abc" }, ok: false },
    ]);
    // A decimal comma is an input habit, not a different rule.
    expect(calculatorSchema.parse({ ...EXAMPLE, r1: "0,641" }).r1).toBe(0.641);
    expect(calculatorSchema.safeParse({ ...EXAMPLE, poles: "3" }).error?.issues[0].message).toMatch(/even/);
  });

  it("the shared schemas are pure: zod, each other and the server's pure constant lists only", () => {
    const dir = join(import.meta.dirname, "../../src/shared/schemas");
    const allowed = new Set(["zod", "../../../server/permissions.ts", "../../../server/plan/priority.ts"]);
    for (const file of readdirSync(dir).filter((f) => f.endsWith(".ts"))) {
      const imports = [...readFileSync(join(dir, file), "utf8").matchAll(/^import[^"']*["']([^"']+)["']/gm)].map((m) => m[1]);
      for (const spec of imports) expect({ file, spec, ok: allowed.has(spec) || spec.startsWith("./") }).toEqual({ file, spec, ok: true });
    }
  });
});
