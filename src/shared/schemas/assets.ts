// Motors (assets): the part of PATCH /api/assets/:id the motor page's "Move to another area" form sends. The full
// motor body (nameplate and all) is server/captures/asset-service.ts, which takes its area rule from here.
import { z } from "zod";

export const assetAreaId = z.number({ message: "Choose an area" }).int("Choose an area").positive("Choose an area");

/** Moving a motor: its new area (on this site or another). Its captures, analyses and findings go with it. */
export const moveMotorBody = z.object({ areaId: assetAreaId });
export type MoveMotorBody = z.output<typeof moveMotorBody>;
