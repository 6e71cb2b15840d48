// Test data for the analyst and manager browser tests: the scenario's fleet (sites, areas, motors, points) and
// the last few captures of chosen motors, synthesised and analysed by the real engine (server/seed's recipes),
// written through the pipeline's own writeAnalysisResult so findings are raised by the production rule.
// The returned cleanup removes exactly what was added, so other browser test files see the database as before.
import type { Knex } from "knex";
import { seedFleet } from "../../server/seed/fleet.ts";
import { historyPlan } from "../../server/seed/story.ts";
import historyTask from "../../server/seed/history-task.ts";
import { nameplateOf } from "../../server/captures/engine-io.ts";
import { writeAnalysisResult } from "../../server/captures/result.ts";
import type { BlobStore } from "../../server/blob/store.ts";
import type { Harness } from "./harness.ts";

export interface SeededHistory {
  /** Capture ids per motor tag, oldest first. */
  captures: Map<string, number[]>;
  assetIds: Map<string, number>;
  cleanup(): Promise<void>;
}

/**
 * Seeds the fleet and, for each tag, its last `count` captures of the demo story (the last `keep` of them with
 * the recording kept, so spectra and waveforms can be served).
 */
export async function seedMotorHistory(h: Harness, tags: string[], count: number, keep = 2): Promise<SeededHistory> {
  const db = h.server.ctx.db as Knex;
  const blob = h.server.ctx.services.blob as BlobStore;
  const assetIds = await seedFleet(db);
  const technician = await db("users").where({ role: "technician" }).first("id");
  const plan = historyPlan(new Date());
  const captures = new Map<string, number[]>();
  const blobKeys: string[] = [];
  for (const tag of tags) {
    const specs = plan.filter((s) => s.tag === tag).slice(-count);
    const asset = await db("assets").where({ tag }).first();
    const ids: number[] = [];
    for (const [i, spec] of specs.entries()) {
      const keepBlob = i >= specs.length - keep;
      const out = historyTask({ spec: { synth: spec.synth, extraVibration: spec.extraVibration, fileName: spec.fileName, keepBlob }, nameplate: nameplateOf(asset) });
      if (out.output.parseError) throw new Error(`${spec.fileName}: ${out.output.parseError.message}`);
      let blobKey: string | null = null;
      if (out.wav) {
        blobKey = `captures/ui-test/${tag}/${spec.seq}.wav`;
        await blob.put(blobKey, out.wav);
        blobKeys.push(blobKey);
      }
      const meta = out.output.meta;
      const [row] = await db("captures")
        .insert({
          asset_id: asset.id,
          taken_at: new Date(spec.takenAt),
          taken_by_user_id: technician?.id ?? null,
          source: "upload",
          file_name: spec.fileName,
          format: "wav",
          sample_rate: meta.sampleRate,
          duration_s: meta.durationS,
          channel_count: meta.channels?.length ?? null,
          channels: meta.channels ? JSON.stringify(meta.channels) : null,
          byte_size: out.byteSize,
          blob_key: blobKey,
          status: "analysing",
          attempts: 1,
          analysis_version: 1,
        })
        .returning("id");
      const w = await writeAnalysisResult(db, {
        captureId: row.id,
        version: 1,
        engineVersion: out.output.engineVersion,
        nameplateVersion: asset.nameplate_version,
        params: { nameplate: nameplateOf(asset), nameplateVersion: asset.nameplate_version, engineVersion: out.output.engineVersion },
        result: out.output.result,
        meta,
      });
      if (!w.written) throw new Error(`the analysis of ${spec.fileName} was not written`);
      ids.push(row.id);
    }
    captures.set(tag, ids);
  }
  return {
    captures,
    assetIds,
    async cleanup() {
      const ids = [...captures.values()].flat();
      if (!ids.length) return;
      const findingIds = (await db("findings").whereIn("capture_id", ids).select("id")).map((f) => f.id);
      if (findingIds.length) {
        await db("inspections").whereIn("finding_id", findingIds).update({ finding_id: null }).catch(() => undefined);
        await db("verdicts").whereIn("finding_id", findingIds).delete();
        await db("findings").whereIn("id", findingIds).delete();
      }
      await db("analyses").whereIn("capture_id", ids).delete();
      await db("captures").whereIn("id", ids).delete();
      for (const key of blobKeys) await blob.delete(key).catch(() => undefined);
    },
  };
}
