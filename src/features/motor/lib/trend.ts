// Pure helpers of the motor page's trends: the ISO 20816-3 machine class used for the zone lines, and which
// captures feed the sideband projection, and the note when the server sent only the newest readings.
import type { AssetDetail } from "../../../lib/contracts.ts";
import type { TrendAnswer, TrendPoint } from "../api/get-motor.ts";
import { formatDate, formatNumber } from "../../../lib/format.ts";
import { projectSideband, type ProjectionOutcome } from "./projection.ts";

/** The fit uses the most recent graded captures, so an old, different regime does not dominate. */
export const FIT_POINTS = 12;

/** Machine group and support for the zone limits; from the nameplate, else group by rated power (> 300 kW → 1), rigid. */
export function machineClass(asset: Pick<AssetDetail, "machineGroup" | "support" | "ratedKw">): { group: 1 | 2; support: "rigid" | "flexible"; assumed: boolean } {
  const g = Number(asset.machineGroup);
  const group = g === 1 || g === 2 ? g : (asset.ratedKw ?? 0) > 300 ? 1 : 2;
  const support = asset.support === "flexible" ? "flexible" : "rigid";
  return { group, support, assumed: !(g === 1 || g === 2) || !asset.support };
}

/** The projection over the last FIT_POINTS assessable captures with a sideband depth. */
export function sidebandProjection(points: TrendPoint[]): { outcome: ProjectionOutcome; used: { t: number; db: number }[] } {
  const graded = points
    .filter((p) => p.sidebandDb !== null && p.rotorAssessable !== false)
    .map((p) => ({ t: Date.parse(p.takenAt), db: p.sidebandDb! }))
    .filter((p) => Number.isFinite(p.t));
  const used = graded.slice(-FIT_POINTS);
  return { outcome: projectSideband(used), used };
}


/**
 * The one-line note when the trend answer holds only the newest readings of the motor's history (the server's cap),
 * or null when it holds them all. The page has no range control, so the note says what is left out.
 */
export function truncationNote(answer: Pick<TrendAnswer, "truncated" | "total" | "points" | "shownFrom"> | undefined): string | null {
  if (!answer?.truncated) return null;
  const shown = answer.points.length;
  const older = Math.max(0, answer.total - shown);
  return (
    `Showing the newest ${formatNumber(shown)} of ${formatNumber(answer.total)} readings, from ${formatDate(answer.shownFrom)}; ` +
    `the ${formatNumber(older)} older ${older === 1 ? "one is" : "ones are"} not drawn.`
  );
}
