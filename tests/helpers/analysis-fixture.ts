// Analysis results for the finding and review tests: a minimal engine result with a chosen rotor grade, sideband
// depth and vibration zone, written through the same code the worker uses.
import type { Knex } from "knex";
import { writeAnalysisResult } from "../../server/captures/result.ts";
import type { AnalysisResult } from "../../src/engine/types.ts";

/** A result graded `grade` ("R1".."R5", or null for not assessable at light load) with the given depth and zone. */
export function analysisResult(grade: string | null, depthDb: number | null, zone: "A" | "B" | "C" | "D" | null = null, rms = 1): AnalysisResult {
  return {
    engineVersion: "test",
    supplyHz: 50,
    syncRpm: 1500,
    slip: 0.02,
    rpm: 1470,
    slipEstimates: [],
    loadPct: 80,
    loadMethod: "slip",
    brokenBar: {
      lowerHz: 48, lowerDb: depthDb, upperHz: 52, upperDb: depthDb, depthDb, grade: grade as never, gradeName: grade ?? "Not assessable",
      estimatedBrokenBars: null, assessable: grade !== null, reason: grade ? null : "light load", loadOscillationSuspected: false, confidence: 1, caveats: [],
    },
    vibration: zone ? { channel: "V", velocityRmsMmS: rms, bandHz: [10, 1000], zone, machineGroup: 2, support: "rigid", oneXHz: 24.5, oneXMmS: rms, twoLineHz: 100, twoLineMmS: 0.1, polePassHz: null } : null,
    quality: [],
    markers: [],
  };
}

/** A capture row and its analysis (version 1), written as the worker writes them; the findings it raised. */
export async function writeAnalysed(db: Knex, assetId: number, takenAt: string, r: AnalysisResult) {
  const [cap] = await db("captures").insert({ asset_id: assetId, taken_at: takenAt, source: "upload", file_name: "x.csv", format: "csv", status: "analysing" }).returning("id");
  const out = await writeAnalysisResult(db, { captureId: cap.id, version: 1, engineVersion: "test", nameplateVersion: 1, params: {}, result: r, meta: {} });
  return { captureId: cap.id as number, ...out };
}
