// Speed helpers of the motor model. The standard formulas (ns = 120·f/P, s = (ns − n)/ns, n = ns·(1 − s))
// live in the engine's shared formulas module; only the synchronous angular speed is added here.

export { rpmFromSlip, syncRpm } from "../formulas.ts";

/** Synchronous angular speed ω_s = 4πf/P in rad/s (mechanical). */
export function syncRadPerS(frequencyHz: number, poles: number): number {
  return (4 * Math.PI * frequencyHz) / poles;
}
