import { describe, expect, it } from "vitest";
import { validate } from "../../src/lib/forms.ts";
import { ApiError } from "../../src/lib/api.ts";
import { allowedMoves, completeSchema, isOverdue, scheduleSchema, suggestDueDate, suggestPriority, todayIso } from "../../src/lib/inspections.ts";
import { checkFile, furthestStatus, rejectionMessage, stepIndex, uploadFormSchema } from "../../src/features/upload/upload-logic.ts";
import { uploadFields } from "../../src/shared/schemas/captures.ts";
import { gridRange, monthGrid, parseMonth } from "../../src/features/plan/calendar.ts";
import { linkify } from "../../src/features/outbox/linkify.ts";
import { visibleNav } from "../../src/app/nav.ts";
import { permissionsOf, ROLES } from "../../server/permissions.ts";
import { gradeFromSidebandDb, parseGrade, parseZone } from "../../src/lib/grades.ts";
import { formatNumber } from "../../src/lib/format.ts";

describe("navigation by permission", () => {
  it("each role sees exactly its screens", () => {
    const nav = Object.fromEntries(ROLES.map((r) => [r, visibleNav(permissionsOf(r)).map((i) => i.label)]));
    expect(nav).toEqual({
      technician: ["My work", "Fleet", "Motors", "Upload", "Calculator"],
      analyst: ["Review", "Fleet", "Motors", "Upload", "Calculator"],
      planner: ["Plan", "Fleet", "Motors", "Calculator"],
      manager: ["Fleet", "Motors", "Calculator"],
      admin: ["Review", "Fleet", "Motors", "Upload", "Calculator", "Admin", "Outbox"],
    });
  });
});

describe("grades, zones and figures", () => {
  it("parses grades in any spelling", () => {
    expect([parseGrade(3), parseGrade("R4"), parseGrade("r1"), parseGrade("Severe"), parseGrade("R6"), parseGrade(null)]).toEqual([3, 4, 1, 5, null, null]);
    expect([parseZone("b"), parseZone("Zone D"), parseZone("E")]).toEqual(["B", "D", null]);
  });
  it("maps sideband depth to the bands (edges belong to the better grade)", () => {
    expect([54, 53.9, 48, 42, 41.9, 36, 35.9].map(gradeFromSidebandDb)).toEqual([1, 2, 2, 3, 4, 4, 5]);
  });
  it("formats figures with a true minus and fixed decimals", () => {
    expect(formatNumber(-1.5, 2)).toBe("−1.50");
    expect(formatNumber(1480)).toBe("1,480");
    expect(formatNumber(null)).toBe("—");
  });
});

describe("inspection rules", () => {
  it("suggests a priority from grade or zone, one step up for critical motors", () => {
    expect(suggestPriority({ level: "R5" })).toBe("urgent");
    expect(suggestPriority({ level: "R4" })).toBe("high");
    expect(suggestPriority({ level: "R3", criticality: "high" })).toBe("high");
    expect(suggestPriority({ level: "R2" })).toBe("low");
    expect(suggestPriority({ level: "C" })).toBe("high");
    expect(suggestPriority({ level: "D", criticality: "high" })).toBe("urgent");
  });
  it("due dates follow the priority", () => {
    const from = new Date(2025, 0, 30);
    expect(suggestDueDate("urgent", from)).toBe("2025-02-01");
    expect(suggestDueDate("low", from)).toBe("2025-03-13");
  });
  it("status moves match the server's workflow; technicians only move forward", () => {
    expect(allowedMoves("planned", "planner")).toEqual(["in_progress", "cancelled"]);
    expect(allowedMoves("in_progress", "technician")).toEqual(["done"]);
    expect(allowedMoves("done", "planner")).toEqual([]);
    expect(isOverdue({ dueDate: "2000-01-01", status: "planned" })).toBe(true);
    expect(isOverdue({ dueDate: "2000-01-01", status: "done" })).toBe(false);
  });
  it("schedule form: required fields, no past dates", () => {
    const ok = { assetId: "4", findingId: "", title: "Inspect M-12", instructions: "", dueDate: todayIso(), assigneeId: "7", priority: "high" };
    expect(validate(scheduleSchema, ok)).toEqual({ ok: true, data: { assetId: 4, findingId: undefined, title: "Inspect M-12", instructions: "", dueDate: todayIso(), assigneeId: 7, priority: "high" } });
    const bad = validate(scheduleSchema, { ...ok, assetId: "", assigneeId: "", dueDate: "2000-01-01", title: " " });
    expect(bad).toMatchObject({ ok: false, errors: { assetId: "Pick a motor.", assigneeId: "Pick a technician.", dueDate: "The due date is in the past.", title: "Give the inspection a title." } });
  });
  it("completing needs an outcome and a note", () => {
    expect(validate(completeSchema, { outcome: "", completionNote: "" })).toMatchObject({ ok: false, errors: { outcome: "Pick an outcome.", completionNote: "Say what was found and done." } });
    expect(validate(completeSchema, { outcome: "repaired", completionNote: "Tightened terminal" }).ok).toBe(true);
  });
});

describe("upload rules", () => {
  it("accepts CSV and WAV only, and not empty files", () => {
    expect(checkFile({ name: "M12_phaseA.CSV", size: 10 })).toBeNull();
    expect(checkFile({ name: "run.wav", size: 10 })).toBeNull();
    expect(checkFile({ name: "photo.jpg", size: 10 })).toMatch(/Not a CSV or WAV file \(\.jpg\)/);
    expect(checkFile({ name: "a.csv", size: 0 })).toBe("The file is empty.");
  });
  it("explains rejections from the server", () => {
    expect(rejectionMessage(new ApiError(413, "The file is larger than the server accepts."))).toBe("Too large for the server: split the recording or shorten it.");
    expect(rejectionMessage(new ApiError(415, "Only CSV and WAV captures are accepted."))).toBe("File type not accepted: Only CSV and WAV captures are accepted.");
    expect(rejectionMessage(new ApiError(422, "No numeric columns.", { fields: { file: "Line 3: not a number." } }))).toBe("The file could not be read: No numeric columns. Line 3: not a number.");
    expect(rejectionMessage(new ApiError(400, "Invalid request", { fields: { assetId: "No such motor." } }))).toBe("Invalid request: No such motor.");
  });
  it("upload form: needs site and motor; time not in the future; sample rate positive", () => {
    const base = { siteId: "1", assetId: "2", measurementPointId: "", takenAt: "2025-01-02T03:04", notes: "  ", sampleRate: "" };
    const r = validate(uploadFormSchema, base);
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.data).toMatchObject({ siteId: 1, assetId: 2, measurementPointId: undefined, notes: undefined, sampleRate: undefined });
    expect(validate(uploadFormSchema, { ...base, assetId: "" })).toMatchObject({ ok: false, errors: { assetId: "Pick a motor." } });
    expect(validate(uploadFormSchema, { ...base, takenAt: "2999-01-01T00:00" })).toMatchObject({ ok: false, errors: { takenAt: "The capture time is in the future." } });
    expect(validate(uploadFormSchema, { ...base, sampleRate: "-5" })).toMatchObject({ ok: false, errors: { sampleRate: "The sample rate must be above 0 Hz." } });
  });
  it("upload form: the fields are the server's own schema, so the browser refuses what the route would refuse", () => {
    for (const k of ["assetId", "measurementPointId", "takenAt", "notes", "sampleRate"] as const) expect(uploadFormSchema.shape[k]).toBe(uploadFields.shape[k]);
    // a local datetime-local value is sent as ISO 8601 in UTC, which the route parses back to the same instant
    const r = validate(uploadFormSchema, { siteId: "1", assetId: "2", takenAt: "2025-01-02T03:04" });
    expect(r.ok && r.data.takenAt).toBe(new Date(2025, 0, 2, 3, 4).toISOString());
    expect(validate(uploadFields, { assetId: "2", takenAt: r.ok ? r.data.takenAt : "" })).toMatchObject({ ok: true, data: { takenAt: new Date(2025, 0, 2, 3, 4).toISOString() } });
    expect(validate(uploadFields, { assetId: "2", sampleRate: "2000000" })).toMatchObject({ ok: false, errors: { sampleRate: "Above 1 MHz is not a plausible sample rate." } });
  });
  it("status steps", () => {
    expect(["received", "queued", "analysing", "analysed", "failed"].map(stepIndex)).toEqual([0, 1, 2, 3, 3]);
  });
  it("the status line takes the furthest step heard: a stale fetch never steps it back", () => {
    expect(furthestStatus("received", "queued", "analysing")).toBe("analysing"); // live event ahead of the fetch
    expect(furthestStatus("received", "analysed", "analysing")).toBe("analysed"); // refetch ahead of the last event
    expect(furthestStatus("received", undefined, undefined)).toBe("received");
    expect(furthestStatus("received", "failed", "analysing")).toBe("failed");
    expect(furthestStatus("received", "analysed", "failed")).toBe("failed");
  });
});

describe("calendar and outbox helpers", () => {
  it("month grid starts on Monday and covers whole weeks", () => {
    const weeks = monthGrid(2025, 1); // February 2025 starts on a Saturday
    expect(weeks[0][0].iso).toBe("2025-01-27");
    expect(weeks.every((w) => w.length === 7)).toBe(true);
    expect(gridRange(weeks)).toEqual({ from: "2025-01-27", to: "2025-03-02" });
    expect(parseMonth("2025-13")).toEqual(parseMonth(null));
  });
  it("linkify makes app links relative and keeps others absolute", () => {
    const parts = linkify("Open http://localhost:0/set-password?token=abc123. Or https://example.org/x", "http://127.0.0.1:5190");
    expect(parts).toEqual([
      { kind: "text", text: "Open " },
      { kind: "link", text: "http://localhost:0/set-password?token=abc123", href: "/set-password?token=abc123", internal: true },
      { kind: "text", text: ". Or " },
      { kind: "link", text: "https://example.org/x", href: "https://example.org/x", internal: false },
    ]);
  });
});
