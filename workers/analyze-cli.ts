// Command line: analyse one capture file.
//   npm run --silent analyze -- FILE --poles N --rated-rpm N [--rated-hz N] [--rotor-bars N] [--rated-kw KW]
//        [--rated-current A] [--voltage V --rated-voltage V] [--group 1|2] [--support rigid|flexible]
//        [--sample-rate HZ] [--drive] [--json]
// With --json stdout carries exactly one JSON object; errors go to stderr with a non-zero exit code.
import { readFileSync } from "node:fs";
import { basename } from "node:path";
import { parseCapture } from "../src/engine/parse/index.ts";
import { analyzeCapture } from "../src/engine/analyze.ts";
import type { AnalysisResult, Nameplate } from "../src/engine/types.ts";

const USAGE =
  "usage: analyze FILE --poles N --rated-rpm N [--rated-hz N] [--rotor-bars N] [--rated-kw KW] [--rated-current A] [--voltage V --rated-voltage V] [--group 1|2] [--support rigid|flexible] [--sample-rate HZ] [--drive] [--json]";

interface Args {
  file: string;
  json: boolean;
  nameplate: Nameplate;
  voltage?: number;
  sampleRate?: number;
}

class UsageError extends Error {}

function parseArgs(argv: string[]): Args {
  const flags = new Map<string, string>();
  const bools = new Set<string>();
  const positional: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === "--json" || a === "--drive") bools.add(a.slice(2));
    else if (a === "--help" || a === "-h") throw new UsageError(USAGE);
    else if (a.startsWith("--")) {
      const [k, inline] = a.slice(2).split("=", 2);
      const v = inline ?? argv[++i];
      if (v === undefined) throw new UsageError(`missing value for --${k}\n${USAGE}`);
      flags.set(k, v);
    } else positional.push(a);
  }
  const known = new Set(["poles", "rated-rpm", "rated-hz", "rotor-bars", "rated-kw", "rated-current", "voltage", "rated-voltage", "group", "support", "sample-rate"]);
  for (const k of flags.keys()) if (!known.has(k)) throw new UsageError(`unknown option --${k}\n${USAGE}`);
  if (positional.length !== 1) throw new UsageError(`expected one FILE\n${USAGE}`);
  const num = (k: string, required = false): number | undefined => {
    const v = flags.get(k);
    if (v === undefined) {
      if (required) throw new UsageError(`--${k} is required\n${USAGE}`);
      return undefined;
    }
    const n = Number(v);
    if (!Number.isFinite(n) || n <= 0) throw new UsageError(`--${k} must be a positive number, got "${v}"`);
    return n;
  };
  const poles = num("poles", true)!;
  if (!Number.isInteger(poles) || poles % 2 !== 0) throw new UsageError(`--poles must be an even whole number, got ${poles}`);
  // The slip method is corrected by (V/V_r)²: a measured voltage alone has nothing to be compared with.
  if (flags.has("voltage") && !flags.has("rated-voltage")) throw new UsageError(`--voltage needs --rated-voltage (the load from slip is corrected by (V/V_rated)²)\n${USAGE}`);
  const group = flags.get("group");
  if (group !== undefined && group !== "1" && group !== "2") throw new UsageError(`--group must be 1 or 2 (ISO 20816-3 machine group), got "${group}"`);
  const support = flags.get("support");
  if (support !== undefined && support !== "rigid" && support !== "flexible") throw new UsageError(`--support must be rigid or flexible, got "${support}"`);
  return {
    file: positional[0],
    json: bools.has("json"),
    nameplate: {
      poles,
      ratedRpm: num("rated-rpm", true)!,
      ratedHz: num("rated-hz"),
      rotorBars: num("rotor-bars"),
      ratedCurrent: num("rated-current"),
      ratedVoltage: num("rated-voltage"),
      ratedKw: num("rated-kw"),
      machineGroup: group === undefined ? undefined : group === "1" ? 1 : 2,
      support: support as "rigid" | "flexible" | undefined,
      driveFed: bools.has("drive") || undefined,
    },
    voltage: num("voltage"),
    sampleRate: num("sample-rate"),
  };
}

const fmt = (v: number | null | undefined, digits: number, unit: string) => (v === null || v === undefined ? "—" : `${v.toFixed(digits)} ${unit}`);

function report(file: string, r: AnalysisResult): string {
  const lines: string[] = [];
  const b = r.brokenBar;
  lines.push(`Barhound analysis of ${file} (engine ${r.engineVersion})`);
  lines.push(`  capture        ${fmt(r.captureSeconds as number, 2, "s")} at ${fmt(r.sampleRate as number, 0, "Hz")}`);
  lines.push(`  supply         ${fmt(r.supplyHz, 3, "Hz")}${r.supplySource ? ` (${r.supplySource})` : ""}`);
  lines.push(`  speed          ${fmt(r.rpm, 1, "rpm")} (synchronous ${fmt(r.syncRpm, 1, "rpm")})`);
  lines.push(`  slip           ${r.slip === null ? "—" : `${(r.slip * 100).toFixed(3)} %`} (confidence ${fmt(r.slipConfidence as number, 2, "")})`.replace(" )", ")"));
  for (const e of r.slipEstimates) lines.push(`    · ${e.method.padEnd(16)} ${(e.slip * 100).toFixed(3)} %  ${e.rpm.toFixed(1)} rpm  conf ${e.confidence.toFixed(2)}`);
  lines.push(`  load           ${fmt(r.loadPct, 1, "%")}${r.loadMethod ? ` (${r.loadMethod} method, estimate)` : ""}`);
  lines.push(`  rotor          ${b.assessable ? `${b.grade} ${b.gradeName}` : `Not assessable: ${b.reason}`}`);
  if (b.lowerDb !== null || b.upperDb !== null) {
    lines.push(`    f − 2sf      ${fmt(b.lowerHz, 3, "Hz")}  ${fmt(b.lowerDb, 1, "dB below f")}`);
    lines.push(`    f + 2sf      ${fmt(b.upperHz, 3, "Hz")}  ${fmt(b.upperDb, 1, "dB below f")}`);
  }
  const phases = (r.phases ?? []) as { channel: string; rmsA: number; lowerDb: number | null; grade: string | null }[];
  if (phases.length > 1) for (const ph of phases) lines.push(`    ${ph.channel.padEnd(12)} ${fmt(ph.rmsA, 2, "A r.m.s.")}  f − 2sf ${fmt(ph.lowerDb, 1, "dB below f")}  ${ph.grade ?? "not graded"}`);
  const park = r.park as { twoSfHz: number; depthDb: number | null; detected: boolean } | null | undefined;
  if (park) lines.push(`    Park's vector 2sf ${fmt(park.twoSfHz, 3, "Hz")}  ${park.detected ? fmt(park.depthDb, 1, "dB below the mean") : "no line"}`);
  if (b.estimatedBrokenBars !== null && b.assessable) lines.push(`    broken bars  ≈ ${b.estimatedBrokenBars.toFixed(1)} bars (Thomson estimate)`);
  if (b.assessable) lines.push(`    confidence   ${b.confidence.toFixed(2)}`);
  for (const c of b.caveats) lines.push(`    note: ${c}`);
  const v = r.vibration;
  if (v) {
    lines.push(`  vibration      ${v.channel}: ${v.velocityRmsMmS.toFixed(2)} mm/s r.m.s. (${v.bandHz[0]}–${v.bandHz[1]} Hz), zone ${v.zone} (group ${v.machineGroup}, ${v.support})`);
    lines.push(`    1×           ${fmt(v.oneXHz, 3, "Hz")}  ${fmt(v.oneXMmS, 2, "mm/s")}`);
    lines.push(`    2×LF         ${fmt(v.twoLineHz, 3, "Hz")}  ${fmt(v.twoLineMmS, 2, "mm/s")}`);
  }
  if (r.quality.length) {
    lines.push("  data quality");
    for (const q of r.quality) lines.push(`    [${q.severity}] ${q.code}: ${q.message}`);
  }
  return lines.join("\n");
}

function main(): number {
  let args: Args;
  try {
    args = parseArgs(process.argv.slice(2));
  } catch (e) {
    process.stderr.write(`${(e as Error).message}\n`);
    return 2;
  }
  let bytes: Uint8Array;
  try {
    bytes = readFileSync(args.file);
  } catch (e) {
    process.stderr.write(`cannot read ${args.file}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}\n`);
    return 1;
  }
  try {
    const capture = parseCapture(bytes, { fileName: basename(args.file), sampleRate: args.sampleRate });
    const result = analyzeCapture(capture, args.nameplate, { measuredVoltage: args.voltage });
    process.stdout.write(args.json ? `${JSON.stringify(result)}\n` : `${report(args.file, result)}\n`);
    return 0;
  } catch (e) {
    process.stderr.write(`${(e as Error).message}\n`);
    return 1;
  }
}

process.exitCode = main();
