// The bearing marker family in the spectrum view (key, style, placement, which channel's markers an axis shows) and
// the motor page's bearing form against the server's request schema.
import { describe, expect, it } from "vitest";
import type { z } from "zod";
import { familyForKey, familyStyle, MARKER_FAMILIES } from "../../src/features/spectrum/lib/marker-style.ts";
import { markersForChannel, placeMarkers } from "../../src/features/spectrum/lib/viewer-math.ts";
import { bearingFormSchema, bearingFormValues } from "../../src/features/motor/api/patch-bearings.ts";
import { bearingsBody } from "../../src/shared/schemas/bearings.ts";

// Keys the spectrum view uses itself (SpectrumViewer's onKeyDown): a, f, +, =, -, _, ?, and Esc / arrows.
const VIEW_KEYS = ["a", "f", "+", "=", "-", "_", "?"];

describe("the bearing marker family", () => {
  it("has its own key, label, colour and dash, clear of the other families and the view's keys", () => {
    const b = familyStyle("bearing");
    expect(b).toMatchObject({ family: "bearing", key: "d", label: expect.stringMatching(/BPFO/) });
    expect(familyForKey("d")?.family).toBe("bearing");
    expect(familyForKey("D")?.family).toBe("bearing"); // Caps Lock on
    const keys = MARKER_FAMILIES.map((f) => f.key);
    expect(new Set(keys).size).toBe(keys.length);
    for (const k of keys) expect(VIEW_KEYS).not.toContain(k);
    const others = MARKER_FAMILIES.filter((f) => f.family !== "bearing");
    expect(others.some((f) => f.color === b.color)).toBe(false);
    expect(others.some((f) => f.dash.join() === b.dash.join())).toBe(false);
  });

  it("is placed at the engine's frequencies and toggled with the other families", () => {
    const markers = [
      { name: "1×", family: "vibration", hz: 24.5, level: 1.2, channel: "accel_h" },
      { name: "BPFO DE", family: "bearing", hz: 77.22, level: 0.12, channel: "accel_h" },
      { name: "2×BSF DE", family: "bearing", hz: 117.6, level: 0, channel: "accel_h" },
      { name: "BPFI NDE", family: "bearing", hz: 133.0, level: 0, channel: "accel_h" },
    ];
    const box = { left: 0, width: 1000 };
    const all = placeMarkers(markers, { min: 0, max: 200 }, box, { families: new Set(["vibration", "bearing"]) });
    expect(all.map((p) => [p.marker.name, p.x])).toEqual([
      ["1×", 122.5],
      ["BPFO DE", 386.1],
      ["2×BSF DE", 588],
      ["BPFI NDE", 665],
    ]);
    const off = placeMarkers(markers, { min: 0, max: 200 }, box, { families: new Set(["vibration"]) });
    expect(off.map((p) => p.marker.name)).toEqual(["1×"]);
  });

  it("each axis shows its own bearing markers; an axis without them borrows them, family by family", () => {
    const markers = [
      { name: "1×", family: "vibration", hz: 24.5, level: 1.2, channel: "accel_h" },
      { name: "BPFO DE", family: "bearing", hz: 77.22, level: 0.03, channel: "accel_h" },
      { name: "BPFO DE", family: "bearing", hz: 77.21, level: 0.2, channel: "accel_v" },
    ];
    const names = ["accel_h", "accel_v", "accel_a"];
    const h = markersForChannel(markers, "accel_h", names);
    expect(h).toEqual({ channelMarkers: [markers[0], markers[1]], markerSource: "accel_h", partly: false });
    // V has its own bearing markers and borrows 1× from H
    const v = markersForChannel(markers, "accel_v", names);
    expect(v.channelMarkers).toEqual([markers[0], markers[2]]);
    expect(v).toMatchObject({ markerSource: "accel_h", partly: true });
    // the axial channel has none of its own: all from H, the first channel that has them
    expect(markersForChannel(markers, "accel_a", names)).toEqual({ channelMarkers: [markers[0], markers[1]], markerSource: "accel_h", partly: false });
  });
});

type Outcome = { ok: boolean; paths: string[] };
const outcome = (schema: z.ZodType, value: unknown): Outcome => {
  const r = schema.safeParse(value);
  return { ok: r.success, paths: r.success ? [] : [...new Set(r.error.issues.map((i) => (i.path.length ? i.path.join(".") : "_")))].sort() };
};

describe("the bearing form and PATCH /assets/:id share their rules", () => {
  const empty = bearingFormValues({ de: null, nde: null });
  const form = (over: Record<string, string>) => ({ ...empty, ...over });
  const cases: { form: Record<string, string>; body: unknown; ok: boolean }[] = [
    { form: {}, body: { de: null, nde: null }, ok: true },
    {
      form: { "de.designation": "6316 C3", "de.rollingElements": "8", "de.elementDiameterMm": "26,988", "de.pitchDiameterMm": "125" },
      body: { de: { designation: "6316 C3", rollingElements: 8, elementDiameterMm: 26.988, pitchDiameterMm: 125, contactAngleDeg: null }, nde: null },
      ok: true,
    },
    { form: { "nde.designation": "6213" }, body: { de: null, nde: { designation: "6213" } }, ok: true },
    // Nb not a whole number, d ≤ 0, φ = 90°
    {
      form: { "de.rollingElements": "8.5", "de.elementDiameterMm": "0", "de.pitchDiameterMm": "50", "de.contactAngleDeg": "90" },
      body: { de: { rollingElements: 8.5, elementDiameterMm: 0, pitchDiameterMm: 50, contactAngleDeg: 90 } },
      ok: false,
    },
    // d ≥ D
    { form: { "nde.rollingElements": "9", "nde.elementDiameterMm": "40", "nde.pitchDiameterMm": "38.5" }, body: { nde: { rollingElements: 9, elementDiameterMm: 40, pitchDiameterMm: 38.5 } }, ok: false },
    // D without Nb and d
    { form: { "de.pitchDiameterMm": "95" }, body: { de: { pitchDiameterMm: 95 } }, ok: false },
  ];
  it("accepts and refuses the same values on the same fields (form 'de.x' ↔ body 'de.x')", () => {
    for (const c of cases) {
      const f = outcome(bearingFormSchema, form(c.form));
      const s = outcome(bearingsBody, c.body);
      expect({ case: c.form, ...f }).toEqual({ case: c.form, ...s });
      expect(f.ok).toBe(c.ok);
      if (f.ok) expect(outcome(bearingsBody, bearingFormSchema.parse(form(c.form)))).toEqual({ ok: true, paths: [] });
    }
  });

  it("the form starts from what is stored, and sends it back unchanged", () => {
    const stored = { de: { designation: "6312 C3", rollingElements: 8, elementDiameterMm: 22.225, pitchDiameterMm: 95, contactAngleDeg: 0 }, nde: null };
    const values = bearingFormValues(stored);
    expect(values["de.elementDiameterMm"]).toBe("22.225");
    expect(values["nde.designation"]).toBe("");
    expect(bearingFormSchema.parse(values)).toEqual(stored);
  });
});
