// The motor and measurement-point forms' own logic: starting values from the stored motor, an edit that sends only
// what changed (null for a field emptied), which nameplate fields an edit touches while the admin types (the offer
// to analyse the stored captures again), the note after saving, and how a point's fields follow its kind.
import { describe, expect, it } from "vitest";
import type { Asset } from "../../src/lib/contracts.ts";
import { fieldList, motorFormSchema, motorFormValues, motorPatchBody, nameplateEdits, savedNote } from "../../src/lib/motor-form.ts";
import { pointFormSchema, pointFormValues, pointSensor, withKind, withStored } from "../../src/features/motor/lib/point-form.ts";
import { assetPatchBody } from "../../src/shared/schemas/assets.ts";

const stored: Asset = {
  id: 7, tag: "GBT-CNV-C07", name: "Incline conveyor 7", areaId: 4, areaName: "Crusher house", siteId: 2, siteName: "Greybeck Quarry",
  drivenEquipment: "conveyor", criticality: "high", ratedKw: 110, ratedVoltage: 460, ratedCurrent: 168, ratedHz: 60, ratedRpm: 1785,
  poles: 4, rotorBars: 46, statorSlots: 60, designLetter: "C", efficiencyClass: "IE3", efficiencyPct: 95.8, powerFactor: 0.86,
  connection: "delta", driveFed: false, machineGroup: 2, support: "rigid", nameplateVersion: 3, latest: null, openFindings: 0,
};

describe("motor form", () => {
  it("starts from the stored motor, or from a new motor's defaults with the register's place", () => {
    const v = motorFormValues(stored);
    expect(v).toMatchObject({ tag: "GBT-CNV-C07", siteId: "2", areaId: "4", ratedHz: "60", ratedRpm: "1785", poles: "4", efficiencyPct: "95.8", driveFed: false, machineGroup: "2" });
    // Unchanged, the form parses back to the stored motor, and an edit sends nothing.
    expect(motorPatchBody(stored, motorFormSchema.parse(v))).toEqual({});
    const fresh = motorFormValues(null, { siteId: "2", areaId: "" });
    expect(fresh).toMatchObject({ tag: "", siteId: "2", areaId: "", ratedHz: "50", drivenEquipment: "pump", criticality: "medium", machineGroup: "2", support: "rigid", driveFed: false });
    expect(motorFormValues({ ...stored, rotorBars: null, connection: null }).rotorBars).toBe("");
  });

  it("an edit sends only the fields changed; an emptied optional field is cleared with null", () => {
    const v = { ...motorFormValues(stored), ratedRpm: "1775", name: "Incline conveyor 7 ", ratedKw: "", connection: "", designLetter: "c" };
    const body = motorPatchBody(stored, motorFormSchema.parse(v));
    expect(body).toEqual({ ratedRpm: 1775, ratedKw: null, connection: null });
    // and the server's PATCH schema takes exactly that
    expect(assetPatchBody.parse(body)).toEqual(body);
    expect(motorPatchBody(stored, motorFormSchema.parse({ ...motorFormValues(stored), areaId: "9", driveFed: true }))).toEqual({ areaId: 9, driveFed: true });
  });

  it("names the nameplate fields changed while typing; an input that does not parse yet counts as changed", () => {
    const v = motorFormValues(stored);
    expect(nameplateEdits(stored, v)).toEqual([]);
    expect(nameplateEdits(stored, { ...v, name: "Other name", criticality: "low" })).toEqual([]);
    expect(nameplateEdits(stored, { ...v, ratedRpm: "1775.0" })).toEqual(["ratedRpm"]);
    expect(nameplateEdits(stored, { ...v, ratedRpm: "1785,0" })).toEqual([]);
    expect(nameplateEdits(stored, { ...v, poles: "", support: "flexible" })).toEqual(["poles", "support"]);
    expect(nameplateEdits(stored, { ...v, driveFed: true, rotorBars: "" })).toEqual(["rotorBars", "driveFed"]);
    expect(fieldList(["ratedRpm"])).toBe("the full-load speed");
    expect(fieldList(["ratedRpm", "poles", "support"])).toBe("the full-load speed, the poles and the support");
  });

  it("the note after saving says which nameplate version applies and how many captures were queued", () => {
    expect(savedNote({ nameplateChanged: false, nameplateVersion: 3, queued: 0, storedCaptures: 5 })).toBe("Motor saved.");
    expect(savedNote({ nameplateChanged: true, nameplateVersion: 4, queued: 5, storedCaptures: 5 })).toBe(
      "Motor saved with nameplate version 4. 5 stored captures are queued for analysis with it; the history updates as each one is done.",
    );
    expect(savedNote({ nameplateChanged: true, nameplateVersion: 4, queued: 1, storedCaptures: 1 })).toMatch(/ 1 stored capture is queued /);
    expect(savedNote({ nameplateChanged: true, nameplateVersion: 4, queued: 0, storedCaptures: 2 })).toBe(
      "Motor saved with nameplate version 4. New captures are analysed with it; the 2 stored ones keep their analyses until analysed again.",
    );
    expect(savedNote({ nameplateChanged: true, nameplateVersion: 2, queued: 0, storedCaptures: 0 })).toBe("Motor saved with nameplate version 2. New captures are analysed with it.");
  });
});

describe("measurement point form", () => {
  it("a new point starts as a phase A current point; a stored one as stored", () => {
    expect(pointFormValues()).toEqual({ name: "", kind: "current", position: "A", ctRatio: "", sensitivity: "", unit: "A" });
    expect(pointFormValues({ id: 3, name: "Drive end horizontal", kind: "vibration", position: "H", ctRatio: null, sensitivity: 100, unit: "m/s2" })).toEqual({
      name: "Drive end horizontal", kind: "vibration", position: "H", ctRatio: "", sensitivity: "100", unit: "m/s2",
    });
  });

  it("changing the kind moves position, unit and sensor field to what the new kind has; a phase never becomes an axis", () => {
    const current = { name: "Phase B", kind: "current", position: "B", ctRatio: "100", sensitivity: "", unit: "A" };
    expect(withKind(current, "vibration")).toEqual({ name: "Phase B", kind: "vibration", position: "H", ctRatio: "", sensitivity: "", unit: "mm/s" });
    expect(withKind(current, "voltage")).toEqual({ name: "Phase B", kind: "voltage", position: "B", ctRatio: "", sensitivity: "", unit: "V" });
    // phase A is not axial A
    expect(withKind({ ...current, position: "A" }, "vibration").position).toBe("H");
    const vib = { name: "DE axial", kind: "vibration", position: "A", ctRatio: "", sensitivity: "10,2", unit: "g" };
    expect(withKind(vib, "vibration")).toEqual(vib);
    expect(withKind({ ...vib, position: "V" }, "current")).toMatchObject({ position: "A", unit: "A", sensitivity: "" });
  });

  it("sends the CT ratio only for current and the sensitivity only for vibration, clearing the other", () => {
    expect(pointFormSchema.parse({ name: "DE H", kind: "vibration", position: "H", ctRatio: "100", sensitivity: "10,2", unit: "m/s2" })).toEqual({
      name: "DE H", kind: "vibration", position: "H", ctRatio: null, sensitivity: 10.2, unit: "m/s2",
    });
    expect(pointFormSchema.parse({ name: "Phase A", kind: "current", position: "", ctRatio: "", sensitivity: "", unit: "" })).toEqual({
      name: "Phase A", kind: "current", position: null, ctRatio: null, sensitivity: null, unit: "A",
    });
  });

  it("keeps a stored value outside the usual options, and describes the sensor", () => {
    expect(withStored([{ value: "A", label: "A" }], "DE-H").map((o) => o.value)).toEqual(["A", "DE-H"]);
    expect(withStored([{ value: "A", label: "A" }], "A")).toHaveLength(1);
    expect(withStored([{ value: "A", label: "A" }], "")).toHaveLength(1);
    expect(pointSensor({ ctRatio: 100, sensitivity: null, unit: "A" })).toBe("CT 100:1");
    expect(pointSensor({ ctRatio: null, sensitivity: 100, unit: "m/s2" })).toBe("100 mV/(m/s2)");
    expect(pointSensor({ ctRatio: null, sensitivity: 10, unit: "g" })).toBe("10 mV/g");
    expect(pointSensor({ ctRatio: null, sensitivity: null, unit: "V" })).toBe("in V");
    expect(pointSensor({ ctRatio: null, sensitivity: null, unit: null })).toBe("");
  });
});
