// Runs the command-line gateway (workers/gateway-cli.ts) as a child process, the way a site gateway would run it.
import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";

const ROOT = path.resolve(import.meta.dirname, "../..");

export interface GatewayCliRun {
  proc: ChildProcess;
  stdout: () => string;
  stderr: () => string;
  /** Resolves when the process has exited (and its output is complete). */
  exited: Promise<{ code: number | null; signal: NodeJS.Signals | null; stdout: string; stderr: string }>;
}

/** Start `workers/gateway-cli.ts ARGS`; `env` is added to the environment (NODE_ENV=test, so test hooks apply). */
export function startGatewayCli(args: string[], env: Record<string, string> = {}): GatewayCliRun {
  let out = "";
  let err = "";
  const proc = spawn(process.execPath, ["--import", "tsx", "workers/gateway-cli.ts", ...args], {
    cwd: ROOT,
    env: { ...process.env, NODE_ENV: "test", ...env },
    stdio: ["ignore", "pipe", "pipe"],
  });
  proc.stdout!.on("data", (d) => (out += d));
  proc.stderr!.on("data", (d) => (err += d));
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null; stdout: string; stderr: string }>((resolve) =>
    proc.on("close", (code, signal) => resolve({ code, signal, stdout: out, stderr: err })),
  );
  return { proc, stdout: () => out, stderr: () => err, exited };
}

/** Run to the end. */
export function runGatewayCli(args: string[], env: Record<string, string> = {}) {
  return startGatewayCli(args, env).exited;
}
