// Six months of demo history for the Northwend scenario, made by running the real engine on synthetic captures
// (server/seed/story.ts has the recipes) and writing every result through the capture pipeline's own
// writeAnalysisResult, so the same rules that run in production raise the findings. Then the people's part of
// the story: verdicts on those findings, inspections planned from them, their history, and the audit trail.
//
// Idempotent: one audit row "demo.seeded" marks a finished seed, and the whole history is written in one
// transaction, so an interrupted seed leaves nothing behind and simply runs again on the next start.
import os from "node:os";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import type { Knex } from "knex";
import { Piscina } from "piscina";
import type { BlobStore } from "../blob/store.ts";
import { nameplateOf } from "../captures/engine-io.ts";
import { analysisMotorModelOf, motorModelParams } from "../captures/motor-model.ts";
import { writeAnalysisResult } from "../captures/result.ts";
import { computePriority } from "../plan/priority.ts";
import { historyPlan, type CaptureSpec } from "./story.ts";
import historyTask, { type HistoryTaskInput, type HistoryTaskOutput } from "./history-task.ts";
import { SCENARIO_TAGS } from "./fleet.ts";
import { SCENARIO } from "./scenario.ts";
import { ALL_DEMO_USERS, EXTRA_DEMO_USERS } from "./people.ts";

const HERE = path.dirname(fileURLToPath(import.meta.url));
export const SEED_MARKER = "demo.seeded";
export const DEMO_BLOB_PREFIX = "captures/demo/";

export interface HistoryOptions {
  blob: BlobStore;
  /** The seed's "now" (default: the clock). Dates are relative to it; the signals are not. */
  now?: Date;
  /** Worker threads for the synthesis and analysis (default: up to 2; 0 = in this thread). */
  threads?: number;
  log?: (line: string) => void;
}

export interface HistorySummary {
  skipped: boolean;
  captures: number;
  keptRecordings: number;
  analyses: number;
  findings: number;
  verdicts: number;
  inspections: number;
  seconds: number;
}

export async function historySeeded(db: Knex | Knex.Transaction): Promise<boolean> {
  return !!(await db("audit_log").where({ action: SEED_MARKER }).first("id"));
}

/** Blob key of a kept demo recording: stable per motor and capture number, so a re-seed overwrites, never piles up. */
export function demoBlobKey(spec: Pick<CaptureSpec, "tag" | "seq">): string {
  return `${DEMO_BLOB_PREFIX}${spec.tag}/${String(spec.seq).padStart(2, "0")}.wav`;
}

const MIN = 60_000;
const HOUR = 60 * MIN;
const DAY = 24 * HOUR;
const plus = (iso: string | Date, ms: number) => new Date(new Date(iso).getTime() + ms);
const dateOnly = (d: Date) => d.toISOString().slice(0, 10);

/** Run the recipes on a pool of threads (or inline); results come back in submission order. */
function makeRunner(threads: number) {
  if (threads <= 0) return { run: async (input: HistoryTaskInput) => historyTask(input), close: async () => {} };
  const pool = new Piscina<HistoryTaskInput, HistoryTaskOutput>({
    filename: pathToFileURL(path.join(HERE, "history-task.ts")).href,
    execArgv: ["--import", "tsx"],
    minThreads: threads,
    maxThreads: threads,
  });
  // A thread that cannot start (no tsx loader, say) must not stop the seed: the same task runs here instead.
  let inline = false;
  const run = async (input: HistoryTaskInput): Promise<HistoryTaskOutput> => {
    if (inline) return historyTask(input);
    try {
      return await pool.run(input);
    } catch (err) {
      if (!inline) console.error(`[seed] worker thread failed (${(err as Error).message}); continuing in this thread`);
      inline = true;
      return historyTask(input);
    }
  };
  return { run, close: () => pool.destroy() };
}

export async function seedHistory(db: Knex, opts: HistoryOptions): Promise<HistorySummary> {
  const t0 = Date.now();
  const log = opts.log ?? (() => {});
  const empty = { captures: 0, keptRecordings: 0, analyses: 0, findings: 0, verdicts: 0, inspections: 0 };
  if (await historySeeded(db)) return { skipped: true, ...empty, seconds: (Date.now() - t0) / 1000 };

  const now = opts.now ?? new Date();
  const plan = historyPlan(now);
  const assets = new Map((await db("assets").whereIn("tag", SCENARIO_TAGS).select("*")).map((a) => [a.tag as string, a]));
  for (const tag of SCENARIO_TAGS) if (!assets.has(tag)) throw new Error(`seed: motor ${tag} is missing; seed the fleet first`);
  const people = new Map((await db("users").whereIn("email", ALL_DEMO_USERS.map((u) => u.email)).select("id", "email", "name")).map((u) => [u.email as string, u]));
  const person = (email: string) => {
    const p = people.get(email);
    if (!p) throw new Error(`seed: demo user ${email} is missing`);
    return p as { id: number; email: string; name: string };
  };

  const threads = opts.threads ?? Math.min(2, os.availableParallelism?.() ?? os.cpus().length);
  log(`Demo history: analysing ${plan.length} synthetic captures with the engine (${threads || "no"} worker threads)…`);
  const runner = makeRunner(threads);
  const written: string[] = [];
  try {
    // Everything is submitted at once; writes follow in plan order (oldest first per motor, as the findings rule needs).
    const pending = plan.map((spec) => {
      const p = runner.run({ spec: { synth: spec.synth, extraVibration: spec.extraVibration, fileName: spec.fileName, keepBlob: spec.keepBlob }, nameplate: nameplateOf(assets.get(spec.tag)), motorModel: analysisMotorModelOf(assets.get(spec.tag)) });
      p.catch(() => {}); // awaited below, in order
      return p;
    });
    const summary = await db.transaction(async (trx) => {
      const captureIds = new Map<CaptureSpec, number>();
      let kept = 0;
      let findingCount = 0;
      const audits: Record<string, unknown>[] = [];
      for (const [i, spec] of plan.entries()) {
        const out = await pending[i];
        if (out.output.parseError) throw new Error(`seed: ${spec.fileName}: ${out.output.parseError.message}`);
        const asset = assets.get(spec.tag);
        const meta = out.output.meta;
        let blobKey: string | null = null;
        if (out.wav) {
          blobKey = demoBlobKey(spec);
          await opts.blob.put(blobKey, out.wav);
          written.push(blobKey);
          kept++;
        }
        const takenAt = new Date(spec.takenAt);
        const by = person(spec.takenBy);
        const [row] = await trx("captures")
          .insert({
            asset_id: asset.id,
            measurement_point_id: null,
            taken_at: takenAt,
            taken_by_user_id: by.id,
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
            notes: spec.notes,
            attempts: 1,
            analysis_version: 1,
          })
          .returning("id");
        captureIds.set(spec, row.id);
        const nameplate = nameplateOf(asset);
        const w = await writeAnalysisResult(trx, {
          captureId: row.id,
          version: 1,
          engineVersion: out.output.engineVersion,
          nameplateVersion: asset.nameplate_version,
          params: { nameplate, nameplateVersion: asset.nameplate_version, engineVersion: out.output.engineVersion, motorModel: motorModelParams(asset, analysisMotorModelOf(asset)) },
          result: out.output.result,
          meta,
        });
        if (!w.written) throw new Error(`seed: the analysis of ${spec.fileName} was not written`);
        findingCount += w.findings.length;
        audits.push({ at: plus(takenAt, 20 * MIN), actor_user_id: by.id, actor_label: by.email, action: "capture.uploaded", subject_type: "asset", subject_id: String(asset.id), details: JSON.stringify({ captures: [row.id], demo: true }) });
      }
      // The pipeline stamps rows with the clock; give them the times of the story instead (received after the
      // round, analysed a few minutes later).
      const ids = [...captureIds.values()];
      await trx.raw(
        `update captures set created_at = taken_at + interval '20 minutes', queued_at = taken_at + interval '20 minutes',
           analysed_at = taken_at + interval '23 minutes', updated_at = taken_at + interval '23 minutes' where id = any(?)`,
        [ids],
      );
      await trx.raw(`update analyses set created_at = taken_at + interval '23 minutes' where capture_id = any(?)`, [ids]);
      await trx.raw(
        `update findings f set created_at = c.taken_at + interval '23 minutes', updated_at = c.taken_at + interval '23 minutes'
           from captures c where c.id = f.capture_id and f.capture_id = any(?)`,
        [ids],
      );
      for (let i = 0; i < audits.length; i += 200) await trx("audit_log").insert(audits.slice(i, i + 200));

      const story = await seedStoryFollowUp(trx, { now, person, assets, plan, captureIds });
      const [{ count: analyses }] = await trx("analyses").whereIn("capture_id", ids).count({ count: "*" });
      const result = { captures: plan.length, keptRecordings: kept, analyses: Number(analyses), findings: findingCount, verdicts: story.verdicts, inspections: story.inspections };
      await trx("audit_log").insert({ actor_label: "seed", action: SEED_MARKER, subject_type: "scenario", subject_id: "northwend", details: JSON.stringify({ ...result, demo: true }) });
      return result;
    });
    const seconds = (Date.now() - t0) / 1000;
    log(`Demo history: ${summary.captures} captures (${summary.keptRecordings} recordings kept), ${summary.findings} findings, ${summary.verdicts} verdicts, ${summary.inspections} inspections in ${seconds.toFixed(1)} s.`);
    return { skipped: false, ...summary, seconds };
  } catch (err) {
    // The transaction rolled back; take the recordings written for it away too.
    for (const key of written) await opts.blob.delete(key).catch(() => {});
    throw err;
  } finally {
    await runner.close();
  }
}

// ---- the people's part of the story ----------------------------------------------------------------------------

interface FollowUpInput {
  now: Date;
  person: (email: string) => { id: number; email: string; name: string };
  assets: Map<string, Record<string, any>>; // eslint-disable-line @typescript-eslint/no-explicit-any
  plan: CaptureSpec[];
  captureIds: Map<CaptureSpec, number>;
}

const ANALYST = "tobias.renn@northwend.example";
const ANALYST_2 = "hana.sorvik@northwend.example";
const PLANNER = "maren.holt@northwend.example";
const INES = "ines.varga@northwend.example";
const KASIMIR = "kasimir.doyle@northwend.example";
const AURELIE = "aurelie.mbeki@northwend.example";

type FindingRow = { id: number; asset_id: number; capture_id: number; kind: string; level: string; status: string; created_at: Date; sideband_db: number | null; load_pct: number | null; vibration_rms: number | null; result: any }; // eslint-disable-line @typescript-eslint/no-explicit-any

interface InspectionPlan {
  tag: string;
  finding?: FindingRow | null;
  title: string;
  instructions: string;
  assignee: string;
  createdAt: Date;
  /** Days from now (negative: in the past). */
  dueInDays: number;
  /** Earlier due date, when it was rescheduled (days from now), and when. */
  rescheduled?: { fromDays: number; at: Date; note: string };
  started?: Date;
  done?: { at: Date; outcome: string; note: string };
  cancelled?: { at: Date; note: string };
}

async function seedStoryFollowUp(trx: Knex.Transaction, inp: FollowUpInput): Promise<{ verdicts: number; inspections: number }> {
  const { now, person, assets } = inp;
  const findingsOf = async (tag: string): Promise<FindingRow[]> =>
    trx("findings as f")
      .join("analyses as an", "an.id", "f.analysis_id")
      .where("f.asset_id", assets.get(tag)!.id)
      .orderBy("f.created_at")
      .select("f.id", "f.asset_id", "f.capture_id", "f.kind", "f.level", "f.status", "f.created_at", "an.sideband_db", "an.load_pct", "an.vibration_rms", "an.result");
  const pick = (rows: FindingRow[], kind: string, level: string) => rows.find((f) => f.kind === kind && f.level === level) ?? null;
  const fmt = (v: number | null | undefined, d = 1) => (v === null || v === undefined ? "?" : Number(v).toFixed(d));

  let verdicts = 0;
  const verdict = async (f: FindingRow | null, who: string, v: "confirmed" | "dismissed" | "remeasure", afterHours: number, note: string) => {
    if (!f) return null;
    const at = plus(f.created_at, afterHours * HOUR);
    const analyst = person(who);
    await trx("verdicts").insert({ finding_id: f.id, analyst_id: analyst.id, verdict: v, note, created_at: at });
    await trx("findings").where({ id: f.id }).update({ status: v, updated_at: at });
    await trx("audit_log").insert({ at, actor_user_id: analyst.id, actor_label: analyst.email, action: "verdict.set", subject_type: "finding", subject_id: String(f.id), details: JSON.stringify({ from: f.status, to: v, note, demo: true }) });
    verdicts++;
    return at;
  };

  const p03 = await findingsOf("TWT-HLP-P03");
  const c07 = await findingsOf("GBT-CNV-C07");
  const k02 = await findingsOf("GBT-CMP-K02");
  const f01 = await findingsOf("GBT-DST-F01");
  const [p03r2, p03r3, p03r4] = [pick(p03, "rotor", "R2"), pick(p03, "rotor", "R3"), pick(p03, "rotor", "R4")];
  const [c07r2] = [pick(c07, "rotor", "R2")];
  const k02rotor = k02.find((f) => f.kind === "rotor") ?? null;
  const f01c = pick(f01, "vibration", "C");

  const bars = (f: FindingRow | null) => f?.result?.brokenBar?.estimatedBrokenBars;
  const p03r2At = await verdict(p03r2, ANALYST, "remeasure", 5,
    `Lower sideband ${fmt(p03r2?.sideband_db)} dB below f on all three phases at ${fmt(p03r2?.load_pct, 0)} % load: Watch band, a step down from the 58–61 dB this pump has shown all year. Re-measure at full load within a week before calling it.`);
  await verdict(p03r3, ANALYST_2, "confirmed", 20,
    `Confirmed: f − 2sf at ${fmt(p03r3?.sideband_db)} dB, the pair sits exactly at 2sf from the slip of the eccentricity and slot-harmonic lines (not a load oscillation), and the pole-pass sidebands around 1× have grown in the vibration. Falling about 2 dB a week since the Watch finding.`);
  await verdict(p03r4, ANALYST, "confirmed", 6,
    `Serious: ${fmt(p03r4?.sideband_db)} dB, about ${fmt(bars(p03r4))} broken bars by the Thomson estimate. Rotor repair or motor swap at the earliest outage; keep high-lift pump 2 on duty meanwhile.`);
  await verdict(c07r2, ANALYST, "confirmed", 26,
    `Confirmed on all three phases: ${fmt(c07r2?.sideband_db)} dB at f − 2sf with ${fmt(c07r2?.load_pct, 0)} % load, slip from two independent lines. Ask for a thermal image of the rotor end and a re-capture at full belt load.`);
  const spacing = k02rotor?.result?.brokenBar?.lowerHz && k02rotor?.result?.supplyHz ? Math.abs(k02rotor.result.supplyHz - k02rotor.result.brokenBar.lowerHz) : null;
  const k02At = await verdict(k02rotor, ANALYST_2, "dismissed", 4,
    `Dismissed: load oscillation, not the rotor. The pair sits at f ± ${fmt(spacing, 2)} Hz; the slip it implies would mean ${fmt(k02rotor?.load_pct, 0)} % load, while the accelerometer's 1× line on the previous round put 2sf at about 0.82 Hz. This capture had no speed line of its own. The compressor's unloader cycling modulates the torque; asked the site to check it.`);
  await verdict(f01c, ANALYST, "confirmed", 9,
    `Confirmed: ${fmt(f01c?.vibration_rms, 2)} mm/s r.m.s., 1× at shaft speed dominates in both directions and has grown since the last-but-two round; rotor current readings are clean. Dust build-up on the impeller is the likely cause: clean it and check the balance.`);

  // Inspections: planned by the planner from the findings (and a few routine ones), worked by the technicians.
  const nowMs = now.getTime();
  const ago = (days: number, hour = 9) => new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate()) - days * DAY + hour * HOUR);
  const remeasure = inp.plan.find((s) => s.label === "p03-remeasure");
  const plans: InspectionPlan[] = [];
  if (p03r2 && p03r2At) {
    plans.push({
      tag: "TWT-HLP-P03", finding: p03r2, assignee: INES, createdAt: plus(p03r2At, 2 * HOUR),
      title: "Re-measure high-lift pump 3 at full load",
      instructions: "Capture 30 s of all three phase currents with the pump on duty at full flow (≥ 85 % load). Upload it against TWT-HLP-P03.",
      dueInDays: Math.round((plus(p03r2At, 7 * DAY).getTime() - nowMs) / DAY),
      started: remeasure ? plus(remeasure.takenAt, -30 * MIN) : undefined,
      done: remeasure ? { at: plus(remeasure.takenAt, 45 * MIN), outcome: "other", note: "Captured 30 s at full flow and uploaded. Sidebands still in the Watch band; nothing unusual at the motor (temperature, noise)." } : undefined,
    });
  }
  if (p03r3) {
    const created = plus(p03r3.created_at, 30 * HOUR);
    plans.push({
      tag: "TWT-HLP-P03", finding: p03r3, assignee: AURELIE, createdAt: created,
      title: "Prepare rotor repair of high-lift pump 3",
      instructions: "Arrange the motor swap with the spare from stores: lifting plan, isolation points, high-lift pump 2 on duty. Send the rotor for bar and end-ring inspection.",
      dueInDays: 9,
      rescheduled: { fromDays: -2, at: plus(created, 6 * DAY), note: "Outage window moved to the next low-demand week." },
      started: ago(10, 8),
    });
  }
  if (c07r2) {
    const created = plus(c07r2.created_at, 2 * DAY);
    plans.push({
      tag: "GBT-CNV-C07", finding: c07r2, assignee: KASIMIR, createdAt: created,
      title: "Thermal image and full-load re-capture of gallery conveyor 7",
      instructions: "At the next belt stop: thermal image of the motor's non-drive end. Then capture 30 s of the three phase currents with the belt fully loaded.",
      dueInDays: -12,
      rescheduled: { fromDays: -26, at: plus(created, 7 * DAY), note: "Belt maintenance stop moved by the terminal." },
    });
  }
  if (f01c) {
    plans.push({
      tag: "GBT-DST-F01", finding: f01c, assignee: KASIMIR, createdAt: plus(f01c.created_at, 20 * HOUR),
      title: "Clean impeller and check balance of baghouse fan 1",
      instructions: "Lock out, open the inspection door, clean the impeller blades; check for erosion and lost balance weights. Re-measure vibration after restart.",
      dueInDays: 3,
    });
  }
  if (k02rotor && k02At) {
    plans.push({
      tag: "GBT-CMP-K02", finding: k02rotor, assignee: KASIMIR, createdAt: plus(k02At, 3 * HOUR),
      title: "Check the unloader cycling of plant-air compressor 2",
      instructions: "The current shows a torque pulsation at about 1 Hz. Check the unloader pilot valve and the pressure switch band with the compressor running.",
      dueInDays: Math.round((plus(k02At, 6 * DAY).getTime() - nowMs) / DAY),
      started: plus(k02At, 5 * DAY),
      done: { at: plus(k02At, 5 * DAY + 3 * HOUR), outcome: "repaired", note: "Unloader pilot valve sticking; cleaned and re-set the pressure band. Pulsation smaller but still there at part demand; process team informed." },
    });
  }
  plans.push(
    {
      tag: "KRB-VNT-F02", assignee: INES, createdAt: ago(6, 10),
      title: "Re-measure hall extract fan with the damper open",
      instructions: "The fan runs at about 30 % load, too light to judge the rotor. With the operator, open the extract damper fully (≥ 60 % load) for the capture, then restore it.",
      dueInDays: 6,
    },
    {
      tag: "TWT-SLU-P01", assignee: INES, createdAt: ago(25, 11),
      title: "Terminal box and cable gland check, sludge transfer pump",
      instructions: "Visual check of the terminal box, glands and earthing after the washdown damage reported by operations.",
      dueInDays: -4,
    },
    {
      tag: "GBT-SHL-L01", assignee: KASIMIR, createdAt: ago(16, 13),
      title: "Thermographic survey of the shiploader motors",
      instructions: "Thermal images of the boom conveyor, shuttle and luffing winch motors and their starters under load.",
      dueInDays: -2,
      started: ago(3, 13),
    },
    {
      tag: "KRB-PMP-P01", assignee: AURELIE, createdAt: ago(40, 9),
      title: "Quarterly current-signature round, Kestrel Ridge pump hall",
      instructions: "Capture all running booster pumps (30 s, three phases) and the drainage pump.",
      dueInDays: -33,
      started: ago(33, 8),
      done: { at: ago(33, 12), outcome: "no_fault_found", note: "All running pumps captured and uploaded; readings normal." },
    },
    {
      tag: "TWT-FIL-B02", assignee: AURELIE, createdAt: ago(60, 10),
      title: "Vibration re-check after coupling replacement, air-scour blower 2",
      instructions: "Measure drive-end vibration in both directions after the new coupling has run in.",
      dueInDays: -45,
      cancelled: { at: ago(50, 15), note: "Blower taken out of service for the filter refurbishment; re-plan when it is back." },
    },
  );

  const planner = person(PLANNER);
  let count = 0;
  for (const p of plans) {
    const asset = assets.get(p.tag)!;
    const tech = person(p.assignee);
    const due = dateOnly(new Date(nowMs + p.dueInDays * DAY));
    const firstDue = p.rescheduled ? dateOnly(new Date(nowMs + p.rescheduled.fromDays * DAY)) : due;
    const grade = p.finding?.kind === "rotor" ? p.finding.level : null;
    const zone = p.finding?.kind === "vibration" ? p.finding.level : null;
    const priority = computePriority({ grade, zone, criticality: asset.criticality });
    const status = p.cancelled ? "cancelled" : p.done ? "done" : p.started ? "in_progress" : "planned";
    const last = p.cancelled?.at ?? p.done?.at ?? p.started ?? p.rescheduled?.at ?? p.createdAt;
    const [row] = await trx("inspections")
      .insert({
        asset_id: asset.id,
        finding_id: p.finding?.id ?? null,
        title: p.title,
        instructions: p.instructions,
        due_date: due,
        assignee_id: tech.id,
        priority,
        status,
        created_by: planner.id,
        completion_note: p.done?.note ?? null,
        outcome: p.done?.outcome ?? null,
        completed_at: p.done?.at ?? null,
        ics_sequence: (p.rescheduled ? 1 : 0) + (p.cancelled ? 1 : 0),
        created_at: p.createdAt,
        updated_at: last,
      })
      .returning("id");
    const id = row.id as number;
    const events: Record<string, unknown>[] = [];
    const auditRows: Record<string, unknown>[] = [];
    const who = (u: { id: number; email: string }) => ({ actor_user_id: u.id, actor_label: u.email });
    events.push({ inspection_id: id, at: p.createdAt, by_user_id: planner.id, kind: "created", from_status: null, to_status: "planned", details: JSON.stringify({ dueDate: firstDue, assigneeId: tech.id, priority }) });
    auditRows.push({ at: p.createdAt, ...who(planner), action: "inspection.planned", subject_type: "inspection", subject_id: String(id), details: JSON.stringify({ assetId: asset.id, findingId: p.finding?.id ?? null, dueDate: firstDue, assigneeId: tech.id, priority, priorityGiven: false, demo: true }) });
    let st = "planned";
    if (p.rescheduled) {
      events.push({ inspection_id: id, at: p.rescheduled.at, by_user_id: planner.id, kind: "rescheduled", from_status: st, to_status: st, note: p.rescheduled.note, details: JSON.stringify({ from: firstDue, to: due }) });
      auditRows.push({ at: p.rescheduled.at, ...who(planner), action: "inspection.rescheduled", subject_type: "inspection", subject_id: String(id), details: JSON.stringify({ from: firstDue, to: due, note: p.rescheduled.note, demo: true }) });
    }
    if (p.started) {
      events.push({ inspection_id: id, at: p.started, by_user_id: tech.id, kind: "status", from_status: st, to_status: "in_progress", note: null });
      auditRows.push({ at: p.started, ...who(tech), action: "inspection.status", subject_type: "inspection", subject_id: String(id), details: JSON.stringify({ from: st, to: "in_progress", note: null, outcome: null, demo: true }) });
      st = "in_progress";
    }
    if (p.done) {
      events.push({ inspection_id: id, at: p.done.at, by_user_id: tech.id, kind: "status", from_status: st, to_status: "done", note: p.done.note });
      auditRows.push({ at: p.done.at, ...who(tech), action: "inspection.status", subject_type: "inspection", subject_id: String(id), details: JSON.stringify({ from: st, to: "done", note: null, outcome: p.done.outcome, demo: true }) });
    }
    if (p.cancelled) {
      events.push({ inspection_id: id, at: p.cancelled.at, by_user_id: planner.id, kind: "status", from_status: st, to_status: "cancelled", note: p.cancelled.note });
      auditRows.push({ at: p.cancelled.at, ...who(planner), action: "inspection.status", subject_type: "inspection", subject_id: String(id), details: JSON.stringify({ from: st, to: "cancelled", note: p.cancelled.note, outcome: null, demo: true }) });
    }
    await trx("inspection_events").insert(events);
    await trx("audit_log").insert(auditRows);
    count++;
  }
  return { verdicts, inspections: count };
}

// ---- taking the demo away again (tests, `npm run sample-data -- --reseed`) --------------------------------------

/**
 * Remove the demo history (captures, analyses, findings, verdicts, inspections, the marker and the demo's audit
 * rows) and the kept recordings. With `fleet: true` also the scenario's motors, areas, sites and extra people.
 */
export async function removeDemo(db: Knex, opts: { blob?: BlobStore; fleet?: boolean } = {}): Promise<void> {
  await db.transaction(async (trx) => {
    const assetIds = (await trx("assets").whereIn("tag", SCENARIO_TAGS).select("id")).map((a) => a.id as number);
    if (assetIds.length) {
      await trx("inspections").whereIn("asset_id", assetIds).delete();
      await trx("findings").whereIn("asset_id", assetIds).delete();
      await trx("analyses").whereIn("asset_id", assetIds).delete();
      await trx("stream_sessions").whereIn("asset_id", assetIds).delete();
      await trx("captures").whereIn("asset_id", assetIds).delete();
    }
    await trx("audit_log").where({ action: SEED_MARKER }).delete();
    await trx("audit_log").whereRaw(`details->>'demo' = 'true'`).delete();
    if (opts.fleet) {
      if (assetIds.length) await trx("assets").whereIn("id", assetIds).delete();
      const sites = SCENARIO.map((s) => s.code);
      const siteIds = (await trx("sites").whereIn("code", sites).select("id")).map((s) => s.id as number);
      const stillUsed = siteIds.length ? await trx("areas as ar").join("assets as a", "a.area_id", "ar.id").whereIn("ar.site_id", siteIds).first("ar.id") : null;
      if (!stillUsed && siteIds.length) await trx("sites").whereIn("id", siteIds).delete();
      await trx("users").whereIn("email", EXTRA_DEMO_USERS.map((u) => u.email)).delete();
    }
  });
  if (opts.blob) for (const key of await opts.blob.list(DEMO_BLOB_PREFIX)) await opts.blob.delete(key).catch(() => {});
}
