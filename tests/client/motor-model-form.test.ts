// The measured-model form of the motor page (src/features/motor/lib/motor-model-form.ts): text inputs → the body
// PUT /api/assets/:id/motor-model takes, with the server's own rules and messages on inputs named by the server's
// field paths; starting values from what was saved; the table's number format, the note after saving and the
// chart's label of a point that does not fit the model.
import { describe, expect, it } from "vitest";
import { validate } from "../../src/lib/forms.ts";
import { flagLabel, formatCircuitValue, modelSavedNote, motorModelFormSchema, motorModelFormValues } from "../../src/features/motor/lib/motor-model-form.ts";
import { assetMotorModelBody, type AssetMotorModelBody } from "../../src/shared/schemas/motor-model.ts";

const testsBody: AssetMotorModelBody = {
  method: "tests",
  noLoad: { V: 400, I: 7.2, P: 520, f: 50 },
  lockedRotor: { V: 72, I: 20, P: 1250, f: 12.5 },
  statorResistanceDc: 0.55,
  designLetter: "B",
};

describe("measured-model form", () => {
  it("starts empty on the test readings, with the motor's design letter", () => {
    const v = motorModelFormValues(null, { designLetter: "C" });
    expect(v).toMatchObject({ method: "tests", designLetter: "C", connection: "", "noLoad.V": "", r1: "", refine: false });
    expect(motorModelFormValues(undefined).designLetter).toBe("");
  });

  it("test readings: text with a decimal comma becomes the nested body the server's schema takes", () => {
    const v = { ...motorModelFormValues(null, { designLetter: "B" }), "noLoad.V": "400", "noLoad.I": "7,2", "noLoad.P": "520", "noLoad.f": "50" };
    Object.assign(v, { "lockedRotor.V": "72", "lockedRotor.I": "20", "lockedRotor.P": "1250", "lockedRotor.f": "12,5", statorResistanceDc: "0,55" });
    const body = motorModelFormSchema.parse(v);
    expect(body).toEqual(testsBody);
    expect(assetMotorModelBody.parse(body)).toEqual(body);
    // Refine and a connection are sent only when chosen.
    expect(motorModelFormSchema.parse({ ...v, refine: true, connection: "delta" })).toEqual({ ...testsBody, refine: true, connection: "delta" });
  });

  it("circuit values: an empty Rc is left out (core loss inside the rotational losses)", () => {
    const v = { ...motorModelFormValues(null), method: "circuit" as const, r1: "0,5", x1: "1.1", r2: "0.4", x2: "1.6", xm: "30", rc: "", rotationalLossW: "240" };
    const body = motorModelFormSchema.parse(v);
    expect(body).toEqual({ method: "circuit", r1: 0.5, x1: 1.1, r2: 0.4, x2: 1.6, xm: 30, rotationalLossW: 240 });
    expect(assetMotorModelBody.parse(body)).toEqual(body);
    expect(motorModelFormSchema.parse({ ...v, rc: "900" })).toMatchObject({ rc: 900 });
  });

  it("errors carry the server's messages on the inputs named by the server's paths", () => {
    const tests = validate(motorModelFormSchema, { ...motorModelFormValues(null), "noLoad.V": "", "noLoad.I": "x", "lockedRotor.P": "-1", designLetter: "" });
    expect(tests.ok).toBe(false);
    if (!tests.ok) {
      expect(tests.errors["noLoad.V"]).toBe("Enter the voltage.");
      expect(tests.errors["noLoad.I"]).toBe("The current must be a number.");
      expect(tests.errors["lockedRotor.P"]).toBe("Must be ≥ 0 W.");
      expect(tests.errors.designLetter).toBe("A, B, C, D or wound");
    }
    // The same messages as the server's own schema gives for the nested body.
    const server = assetMotorModelBody.safeParse({ method: "tests", noLoad: { I: 7, P: 1, f: 50 }, lockedRotor: { V: 1, I: 1, P: -1, f: 1 }, designLetter: "B" });
    expect(server.error?.issues.map((i) => [i.path.join("."), i.message])).toEqual([
      ["noLoad.V", "Enter the voltage."],
      ["lockedRotor.P", "Must be ≥ 0 W."],
    ]);
    const circuit = validate(motorModelFormSchema, { ...motorModelFormValues(null), method: "circuit", r1: "0.5", x1: "-1", r2: "0", x2: "1", xm: "20", rotationalLossW: "" });
    expect(circuit.ok).toBe(false);
    if (!circuit.ok) expect(circuit.errors).toEqual({ x1: "Must be ≥ 0 Ω.", r2: "Must be above 0 Ω.", rotationalLossW: "Enter the rotational losses." });
  });

  it("starts again from what was saved, and gives the same body back", () => {
    for (const entered of [testsBody, { method: "circuit", r1: 0.5, x1: 1.1, r2: 0.4, x2: 1.6, xm: 30, rc: 900, rotationalLossW: 240, connection: "delta" } as AssetMotorModelBody]) {
      expect(motorModelFormSchema.parse(motorModelFormValues(entered))).toEqual(entered);
    }
  });
});

describe("what the motor page writes", () => {
  it("circuit values: ohms to four significant digits, watts whole, a missing value as a dash", () => {
    expect(formatCircuitValue(0.123456, "Ω")).toBe("0.1235 Ω");
    expect(formatCircuitValue(26.31234, "Ω")).toBe("26.31 Ω");
    expect(formatCircuitValue(243.6, "W")).toBe("244 W");
    expect(formatCircuitValue(null, "Ω")).toBe("—");
  });
  it("the note after saving says what happened to the stored captures", () => {
    expect(modelSavedNote({ queued: 3, storedCaptures: 3 })).toBe("Measured values saved: the motor model uses them. 3 stored captures are queued for analysis with it; the history updates as each one is done.");
    expect(modelSavedNote({ cleared: true, queued: 0, storedCaptures: 1 })).toMatch(/^Measured values removed: .* the 1 stored one keeps its analyses until analysed again\.$/);
    expect(modelSavedNote({ queued: 0, storedCaptures: 0 })).toMatch(/New captures are analysed with it\.$/);
  });
  it("a flagged operating point is labelled in words, never by colour alone", () => {
    expect(flagLabel({ code: "current-mismatch", message: "" }, 2.25)).toBe("current +125 %");
    expect(flagLabel({ code: "current-mismatch", message: "" }, 0.5)).toBe("current \u221250 %");
    expect(flagLabel({ code: "beyond-breakdown", message: "" })).toBe("beyond breakdown");
  });
});
