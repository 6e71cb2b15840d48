// Plan and My work: where a link to one inspection lands for each role, the ?inspection= parameter, the outcome labels,
// and the planner's reschedule / reassign form against the server's PATCH schema.
import { describe, expect, it } from "vitest";
import { validate } from "../../src/lib/forms.ts";
import { inspectionParam, OUTCOMES, outcomeLabel, rescheduleSchema, todayIso } from "../../src/lib/inspections.ts";
import { inspectionPatchBody, OUTCOMES as OUTCOME_VALUES, PAST_DUE_DATE } from "../../src/shared/schemas/inspections.ts";
import { inspectionLink, inspectionPath } from "../../server/plan/links.ts";
import { visibleNav } from "../../src/app/nav.ts";
import { permissionsOf, ROLES } from "../../server/permissions.ts";

const addDays = (n: number) => {
  const d = new Date();
  d.setDate(d.getDate() + n);
  return todayIso(d);
};

describe("a link to one inspection", () => {
  it("opens on a screen the role has in its navigation: Plan for the planner, My work for the technician, else the motor", () => {
    const i = { id: 41, assetId: 7 };
    expect(Object.fromEntries(ROLES.map((r) => [r, inspectionPath(r, i)]))).toEqual({
      technician: "/my-work?inspection=41",
      analyst: "/motors/7",
      planner: "/plan?inspection=41",
      manager: "/motors/7",
      admin: "/motors/7",
    });
    for (const role of ROLES) {
      const path = inspectionPath(role, i).split("?")[0];
      expect(visibleNav(permissionsOf(role)).some((n) => path === n.to || path.startsWith(`${n.to}/`)), role).toBe(true);
    }
    expect(inspectionPath(null, i)).toBe("/motors/7");
    expect(inspectionLink("https://barhound.example/", "technician", i)).toBe("https://barhound.example/my-work?inspection=41");
  });

  it("?inspection= takes a positive id only", () => {
    const p = (q: string) => inspectionParam(new URLSearchParams(q));
    expect([p("inspection=12"), p("view=month&inspection=3"), p(""), p("inspection="), p("inspection=0"), p("inspection=-4"), p("inspection=1e3"), p("inspection=12abc")]).toEqual([12, 3, null, null, null, null, null, null]);
  });
});

describe("outcome labels", () => {
  it("every outcome of the server's list has a label in Barhound's words; none shows its raw value", () => {
    expect(OUTCOMES.map((o) => o.value).sort()).toEqual([...OUTCOME_VALUES].sort());
    for (const v of OUTCOME_VALUES) expect(outcomeLabel(v)).not.toBe(v);
    expect(outcomeLabel("remeasure")).toBe("Re-measure"); // the verdict's word (product vocabulary)
    expect(outcomeLabel("other")).toBe("Other (see note)");
    expect(outcomeLabel(null)).toBe("");
    expect(outcomeLabel("something_new")).toBe("something_new");
  });
});

describe("reschedule or reassign form", () => {
  it("refuses a due date in the past on the field, before sending; an unchanged overdue date may stand", () => {
    const overdue = "2000-01-01";
    const form = rescheduleSchema(overdue);
    expect(validate(form, { dueDate: addDays(-1), assigneeId: "7", priority: "high" })).toEqual({ ok: false, errors: { dueDate: PAST_DUE_DATE } });
    expect(validate(form, { dueDate: "2000-01-02", assigneeId: "7", priority: "high" })).toEqual({ ok: false, errors: { dueDate: PAST_DUE_DATE } });
    expect(validate(form, { dueDate: "2026-02-30", assigneeId: "7", priority: "high" })).toMatchObject({ ok: false, errors: { dueDate: "Not a calendar date." } });
    expect(validate(form, { dueDate: overdue, assigneeId: "7", priority: "high" })).toEqual({ ok: true, data: { dueDate: overdue, assigneeId: 7, priority: "high" } });
    expect(validate(form, { dueDate: todayIso(), assigneeId: "7", priority: "high" }).ok).toBe(true);
    // the form's own date field min is today; the shared rule is the same as scheduling
    expect(validate(rescheduleSchema(addDays(3)), { dueDate: addDays(10), assigneeId: "7", priority: "low" }).ok).toBe(true);
  });

  it("Nobody is null, which the server's PATCH schema takes; what the form gives is a valid PATCH body", () => {
    const r = validate(rescheduleSchema(addDays(3)), { dueDate: addDays(5), assigneeId: "", priority: "normal" });
    expect(r).toEqual({ ok: true, data: { dueDate: addDays(5), assigneeId: null, priority: "normal" } });
    if (r.ok) expect(inspectionPatchBody.safeParse(r.data).success).toBe(true);
    expect(inspectionPatchBody.safeParse({ assigneeId: null }).success).toBe(true);
    expect(inspectionPatchBody.safeParse({ assigneeId: 0 }).success).toBe(false);
    expect(validate(rescheduleSchema(addDays(3)), { dueDate: addDays(3), assigneeId: "x", priority: "normal" })).toMatchObject({ ok: false, errors: { assigneeId: "Pick a technician." } });
    expect(validate(rescheduleSchema(addDays(3)), { dueDate: addDays(3), assigneeId: "", priority: "soon" }).ok).toBe(false);
  });
});
