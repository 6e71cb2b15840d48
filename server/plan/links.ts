import { can, type Role } from "../permissions.ts";

// Which screen opens one inspection for the person a link is for (mail, calendar entry), by their role; the screens
// and their guards are the client's (src/app/router.tsx, src/app/nav.ts):
//  - Plan (inspections.plan: the planner) opens the inspection's dialog from `?inspection=<id>`;
//  - My work (inspections.work without planning: the technician) opens the inspection's detail from `?inspection=<id>`,
//    also when it is no longer on their list (reassigned, cancelled), so the mail's link never lands on a dead end;
//  - everyone else may read the motor's page, which lists the motor's inspections.
// A role that may open neither Plan nor My work is never sent to them ("Not available to your role").

export interface InspectionRef {
  id: number;
  assetId: number;
}

export function inspectionPath(role: Role | null | undefined, i: InspectionRef): string {
  if (can(role, "inspections.plan")) return `/plan?inspection=${i.id}`;
  if (can(role, "inspections.work")) return `/my-work?inspection=${i.id}`;
  return `/motors/${i.assetId}`;
}

/** The same as an absolute URL under the deployment's public address. */
export function inspectionLink(publicUrl: string, role: Role | null | undefined, i: InspectionRef): string {
  return `${publicUrl.replace(/\/$/, "")}${inspectionPath(role, i)}`;
}
