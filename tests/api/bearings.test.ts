import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { signedIn } from "../helpers/context.ts";
import { captureFile, makeMotor, makePipelineEnv, type PipelineEnv } from "../helpers/pipeline.ts";
import { runAnalysisJob } from "../../server/captures/analysis-job.ts";
import { blobStoreOf } from "../../server/blob/index.ts";
import analysisTask from "../../workers/analysis-task.ts";
import { defectOrders } from "../../src/engine/bearings.ts";

// Bearing geometry on motors: the request schema's field messages, nameplate versioning, the register import's
// bearing columns, and an analysed capture of a motor with bearings carrying the bearing result.
let env: PipelineEnv;
const sfx = Date.now().toString(36);
let areaId: number;
let siteCode: string;

beforeAll(async () => {
  env = await makePipelineEnv();
  const { site, area } = await makeMotor(env.db);
  areaId = area.id;
  siteCode = site.code;
}, 60_000);
afterAll(async () => env?.close());

// A 6309-size deep-groove ball bearing (invented values typical of the size: 8 balls of 17.5 mm on a 72.5 mm pitch circle).
const de = { designation: "6309 C3", rollingElements: 8, elementDiameterMm: 17.5, pitchDiameterMm: 72.5, contactAngleDeg: 0 };
const nde = { designation: "6307", rollingElements: 8, elementDiameterMm: 13.5, pitchDiameterMm: 57.5 };
const motor = (over: Record<string, unknown> = {}) => ({ tag: `B-${sfx}-1`, name: "Bearing pump", areaId, ratedHz: 50, ratedRpm: 1455, poles: 4, ratedKw: 11, rotorBars: 28, ...over });

describe("bearing geometry on a motor", () => {
  let id: number;

  it("is stored per end, answered as bearings { de, nde }, and not given is null", async () => {
    const admin = await signedIn(env.app, "admin");
    const res = await admin.post("/api/assets").send(motor({ bearings: { de } }));
    expect(res.status).toBe(201);
    id = res.body.id;
    expect(res.body.bearings).toEqual({ de, nde: null });
    const plain = await admin.post("/api/assets").send(motor({ tag: `B-${sfx}-plain` }));
    expect(plain.body.bearings).toEqual({ de: null, nde: null });
    // a designation alone is fine (geometry not known yet); the contact angle then stays unset
    const named = await admin.patch(`/api/assets/${plain.body.id}`).send({ bearings: { nde: { designation: "6210 2RS" } } });
    expect(named.status).toBe(200);
    expect(named.body.bearings.nde).toEqual({ designation: "6210 2RS", rollingElements: null, elementDiameterMm: null, pitchDiameterMm: null, contactAngleDeg: null });
  });

  it("refuses bad geometry with a message on each field, and changes nothing stored", async () => {
    const admin = await signedIn(env.app, "admin");
    const before = await env.db("assets").where({ id }).first();
    const bad = await admin.patch(`/api/assets/${id}`).send({ bearings: { de: { rollingElements: 2.5, elementDiameterMm: -1, pitchDiameterMm: 50, contactAngleDeg: 90 } } });
    expect(bad.status).toBe(400);
    expect(bad.body.fields).toMatchObject({
      "bearings.de.rollingElements": expect.stringMatching(/whole number from 3 to 60/),
      "bearings.de.elementDiameterMm": expect.stringMatching(/above 0 mm/),
      "bearings.de.contactAngleDeg": expect.stringMatching(/0° up to \(not including\) 90°/),
    });
    const many = await admin.patch(`/api/assets/${id}`).send({ bearings: { nde: { rollingElements: 61, elementDiameterMm: 10, pitchDiameterMm: 50 } } });
    expect(many.body.fields["bearings.nde.rollingElements"]).toMatch(/3 to 60/);
    // 0 < d < D
    const inverted = await admin.patch(`/api/assets/${id}`).send({ bearings: { de: { rollingElements: 8, elementDiameterMm: 60, pitchDiameterMm: 50 } } });
    expect(inverted.body.fields).toEqual({ "bearings.de.pitchDiameterMm": expect.stringMatching(/larger than the rolling-element diameter d \(60 mm\)/) });
    // Nb, d and D come together
    const partial = await admin.patch(`/api/assets/${id}`).send({ bearings: { de: { rollingElements: 8 } } });
    expect(Object.keys(partial.body.fields).sort()).toEqual(["bearings.de.elementDiameterMm", "bearings.de.pitchDiameterMm"]);
    expect(partial.body.fields["bearings.de.pitchDiameterMm"]).toMatch(/Nb, d and D together/);
    // 20 balls of 20 mm do not fit round a 100 mm pitch circle (centre spacing D·sin(180°/Nb) = 15.64 mm)
    const crowded = await admin.patch(`/api/assets/${id}`).send({ bearings: { de: { rollingElements: 20, elementDiameterMm: 20, pitchDiameterMm: 100 } } });
    expect(crowded.body.fields["bearings.de.elementDiameterMm"]).toMatch(/do not fit .* at most D·sin\(180°\/Nb\) = 15\.64 mm/);
    const unknownField = await admin.patch(`/api/assets/${id}`).send({ bearings: { de: { balls: 8 } } });
    expect(unknownField.status).toBe(400);
    expect(await env.db("assets").where({ id }).first()).toEqual(before);
  });

  it("a change bumps the nameplate version; the same values again do not; null clears an end", async () => {
    const admin = await signedIn(env.app, "admin");
    const v = (await admin.get(`/api/assets/${id}`)).body.nameplateVersion as number;
    const same = await admin.patch(`/api/assets/${id}`).send({ bearings: { de } });
    expect(same.body.nameplateVersion).toBe(v);
    const added = await admin.patch(`/api/assets/${id}`).send({ bearings: { nde } });
    expect(added.body).toMatchObject({ nameplateVersion: v + 1, bearings: { de, nde: { ...nde, contactAngleDeg: null } } });
    const cleared = await admin.patch(`/api/assets/${id}`).send({ bearings: { nde: null } });
    expect(cleared.body).toMatchObject({ nameplateVersion: v + 2, bearings: { de, nde: null } });
    const audit = (await admin.get(`/api/audit?subjectType=asset&subjectId=${id}`)).body.items as { action: string; details: { nameplateChanged?: string[] } }[];
    expect(audit.find((a) => a.action === "asset.updated" && a.details.nameplateChanged?.includes("bearings.nde"))).toBeTruthy();
  });

  it("only admins edit bearings", async () => {
    for (const role of ["technician", "analyst", "planner", "manager"] as const)
      expect((await (await signedIn(env.app, role)).patch(`/api/assets/${id}`).send({ bearings: { de: null } })).status).toBe(403);
  });
});

describe("register import with bearing columns", () => {
  it("creates motors with bearings, keeps an end whose cells are empty, and reports bad geometry by line", async () => {
    const admin = await signedIn(env.app, "admin");
    const header = "Tag,Site,Area,Rated rpm,Poles,DE bearing,DE elements,DE element diameter mm,DE pitch diameter mm,NDE bearing,NDE elements,NDE element diameter mm,NDE pitch diameter mm,NDE contact angle deg";
    const csv = [
      header,
      `BI-${sfx}-1,${siteCode},Pump house,1475,4,6312 C3,8,22.225,95,6310,8,19.05,80,0`,
      `BI-${sfx}-2,${siteCode},Pump house,1475,4,,,,,,,,,`,
      `BI-${sfx}-3,${siteCode},Pump house,1475,4,6312,8,95,22.225,,,,,`,
      `BI-${sfx}-4,${siteCode},Pump house,1475,4,6312,eight,22.225,95,,,,,`,
    ].join("\n");
    const res = await admin.post("/api/assets/import").attach("file", Buffer.from(csv), "register.csv");
    expect(res.status).toBe(200);
    expect(res.body.created).toBe(2);
    expect(res.body.errors.map((e: { line: number }) => e.line)).toEqual([4, 5]);
    expect(res.body.errors[0].message).toMatch(/bearings\.de\.pitchDiameterMm: The pitch diameter D must be larger/);
    expect(res.body.errors[1].message).toMatch(/bearings\.de\.rollingElements: Give the number of rolling elements/);
    const one = await env.db("assets").where({ tag: `BI-${sfx}-1` }).first();
    expect(one).toMatchObject({ bearing_de_designation: "6312 C3", bearing_de_elements: 8, bearing_de_pitch_mm: 95, bearing_nde_designation: "6310", bearing_nde_contact_deg: 0 });
    expect(one.bearing_de_element_mm).toBeCloseTo(22.225, 4);
    const two = await env.db("assets").where({ tag: `BI-${sfx}-2` }).first();
    expect(two).toMatchObject({ bearing_de_designation: null, bearing_de_elements: null, bearing_nde_pitch_mm: null });

    // an update row: the NDE cells empty keep the stored NDE bearing; the DE cells replace DE
    const upd = `Tag,Site,Area,DE bearing,DE elements,DE element diameter mm,DE pitch diameter mm,NDE bearing\nBI-${sfx}-1,${siteCode},Pump house,6312 C4,8,22.225,95,\n`;
    expect((await admin.post("/api/assets/import").attach("file", Buffer.from(upd), "u.csv")).body).toEqual({ created: 0, updated: 1, errors: [] });
    const after = await env.db("assets").where({ tag: `BI-${sfx}-1` }).first();
    expect(after).toMatchObject({ bearing_de_designation: "6312 C4", bearing_de_contact_deg: null, bearing_nde_designation: "6310", nameplate_version: one.nameplate_version + 1 });
  });
});

describe("analysis of a motor with bearings", () => {
  it("an analysed capture carries the bearing result, with an outer-race line found and its marker", async () => {
    const { asset } = await makeMotor(env.db, {
      bearing_de_designation: "6309 C3",
      bearing_de_elements: de.rollingElements,
      bearing_de_element_mm: de.elementDiameterMm,
      bearing_de_pitch_mm: de.pitchDiameterMm,
      bearing_de_contact_deg: 0,
    });
    // a vibration capture with an outer-race tone 1.5 % below the BPFO of the motor's DE bearing (synth.ts truth)
    const bpfo = defectOrders({ position: "DE", ...de }).BPFO;
    const file = captureFile({ format: "wav", phases: 3, durationS: 10, seed: 41, vibration: { shaftOrderLines: [{ order: bpfo * 0.985, vRms: 0.1 }] } });
    const tech = await signedIn(env.app, "technician");
    const up = await tech.post("/api/captures").field("assetId", String(asset.id)).field("takenAt", "2026-11-20T08:00:00Z").attach("file", file, "bearing.wav");
    expect(up.status).toBe(202);
    const captureId = up.body.captures[0].id as number;
    const deps = { db: env.db, blob: blobStoreOf(env.ctx), runTask: async (i: Parameters<typeof analysisTask>[0]) => analysisTask(i) };
    expect(await runAnalysisJob(deps, { captureId, version: 1 }, { retryCount: 0, retryLimit: 2 })).toBe("analysed");

    const cap = (await (await signedIn(env.app, "analyst")).get(`/api/captures/${captureId}`)).body;
    expect(cap.status).toBe("analysed");
    const b = cap.analysis.bearings;
    expect(b).toMatchObject({ channels: ["accel_h"], note: null, tolerance: { lowPct: 3, highPct: 1 } });
    // 4-pole motor at slip 0.03 on 50 Hz (captureFile): fr = 24.25 Hz
    expect(b.shaftHz).toBeCloseTo(24.25, 1);
    expect(b.bearings).toHaveLength(1);
    expect(b.bearings[0]).toMatchObject({ position: "DE", designation: "6309 C3" });
    const line = b.bearings[0].defects.find((d: { defect: string }) => d.defect === "BPFO").lines[0];
    expect(line).toMatchObject({ label: "BPFO DE", status: "found", unit: "m/s2", channel: "accel_h" });
    expect(Math.abs(line.foundHz - bpfo * 0.985 * b.shaftHz)).toBeLessThan(0.05);
    expect(Math.abs(line.velocityMmS - 0.1)).toBeLessThan(0.005);
    expect(cap.analysis.markers).toContainEqual(expect.objectContaining({ name: "BPFO DE", family: "bearing", hz: line.foundHz, channel: "accel_h" }));
    // the analysis row records the nameplate used, bearings included
    const row = await env.db("analyses").where({ capture_id: captureId }).first();
    expect(row.params.nameplate.bearings).toEqual([{ position: "DE", ...de }]);
  });
});
