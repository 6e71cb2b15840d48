// Response shapes of the server API (docs/api.md), as TypeScript types for the client. Field names are camelCase.
// Values the contract leaves open (e.g. how a grade is spelled) are typed loosely and normalised in lib/grades.ts.
import type { Permission, Role } from "../../server/permissions.ts";
import type { AnalysisResult } from "../engine/types.ts";

export type { Permission, Role };
export { ROLES } from "../../server/permissions.ts";

export interface SessionUser {
  id: number;
  email: string;
  name: string;
  role: Role;
}
export interface Me {
  user: SessionUser;
  permissions: Permission[];
}

export interface Area {
  id: number;
  name: string;
}
export interface Site {
  id: number;
  code: string;
  name: string;
  timezone: string;
  areas: Area[];
}

/** R1..R5 as a number or "R3"; null when there is no grade. */
export type GradeValue = number | string | null;

export interface LatestReading {
  analysisId: number;
  captureId: number;
  takenAt: string;
  rotorGrade: GradeValue;
  rotorAssessable: boolean | null;
  sidebandDb: number | null;
  loadPct: number | null;
  slip: number | null;
  rpm: number | null;
  supplyHz: number | null;
  vibrationRms: number | null;
  vibrationZone: string | null;
}

export interface Asset {
  id: number;
  tag: string;
  name: string;
  areaId: number;
  areaName: string;
  siteId: number;
  siteName: string;
  drivenEquipment: string | null;
  criticality: string | number | null;
  ratedKw: number | null;
  ratedVoltage: number | null;
  ratedCurrent: number | null;
  ratedHz: number | null;
  ratedRpm: number | null;
  poles: number | null;
  rotorBars: number | null;
  statorSlots: number | null;
  designLetter: string | null;
  efficiencyClass: string | null;
  efficiencyPct: number | null;
  powerFactor: number | null;
  connection: string | null;
  driveFed: boolean | null;
  machineGroup: string | number | null;
  support: string | null;
  /** Rolling bearings on record, drive end and non-drive end (null: not given). */
  bearings?: { de: AssetBearing | null; nde: AssetBearing | null };
  nameplateVersion: number;
  latest: LatestReading | null;
  openFindings: number;
}

/** One bearing as GET /assets/:id answers it: designation, Nb, d and D (mm), contact angle (°). */
export interface AssetBearing {
  designation: string | null;
  rollingElements: number | null;
  elementDiameterMm: number | null;
  pitchDiameterMm: number | null;
  contactAngleDeg: number | null;
}

export interface MeasurementPoint {
  id: number;
  name: string;
  kind: string;
  position: string | null;
  ctRatio: number | null;
  sensitivity: number | null;
  unit: string | null;
}
export interface AssetDetail extends Asset {
  measurementPoints: MeasurementPoint[];
  /** Captures of the motor, and how many of them keep their recording (what a re-analysis takes). */
  captureCount: number;
  storedCaptureCount: number;
}

export type CaptureStatus = "received" | "queued" | "analysing" | "analysed" | "failed";

/** The engine's result for a capture, merged with the analysis row's id and versions (GET /captures/:id). */
export type CaptureAnalysis = AnalysisResult & {
  id: number;
  version: number;
  engineVersion: string;
  nameplateVersion: number | null;
  analysedAt: string;
};

export interface Capture {
  id: number;
  assetId: number;
  assetTag: string;
  assetName: string;
  siteId: number;
  measurementPointId: number | null;
  takenAt: string | null;
  /** The signed-in user who uploaded it; null for gateway streams and imports. */
  takenBy: { id: number; name: string } | null;
  gatewayId: number | null;
  source: string;
  fileName: string | null;
  format: string | null;
  sampleRate: number | null;
  durationS: number | null;
  byteSize: number | null;
  channels: { name: string; kind: string; unit: string; position?: string | null }[];
  status: CaptureStatus;
  error: string | null;
  notes: string | null;
  attempts: number;
  createdAt: string;
  queuedAt: string | null;
  analysedAt: string | null;
  /** The current analysis's headline readings, or null before one exists. */
  readings: { rotorGrade: GradeValue | null; rotorAssessable: boolean; sidebandDb: number | null; loadPct: number | null; vibrationZone: string | null } | null;
  /** Only on GET /captures/:id (the list leaves it out): the current analysis, or null before one exists. */
  analysis?: CaptureAnalysis | null;
  /** Only on GET /captures/:id: every analysis version of the capture. */
  analyses?: { id: number; version: number; isCurrent: boolean; engineVersion: string; nameplateVersion: number | null; createdAt: string }[];
}

/** GET /captures/:id: a capture with its current analysis. */
export type CaptureDetail = Capture & { analysis: CaptureAnalysis | null };

/** GET /captures/:id/analyses: one stored analysis of a capture, with what it was computed from and its readings. */
export interface AnalysisVersion {
  id: number;
  version: number;
  isCurrent: boolean;
  engineVersion: string;
  nameplateVersion: number | null;
  /** As the worker stored it: `{ nameplate, nameplateVersion, engineVersion }` (read loosely: older rows may differ). */
  params: Record<string, unknown>;
  createdAt: string;
  supplyHz: number | null;
  slip: number | null;
  rpm: number | null;
  loadPct: number | null;
  sidebandDb: number | null;
  rotorGrade: GradeValue | null;
  rotorAssessable: boolean;
  rotorReason: string | null;
  vibrationRms: number | null;
  vibrationZone: string | null;
}

/** GET /captures/:id/analyses/:analysisId: one stored result, shaped as the capture detail's `analysis`. */
export type CaptureAnalysisVersion = CaptureAnalysis & { isCurrent: boolean };

export interface Verdict {
  id: number;
  verdict: string;
  note: string | null;
  analystId: number | null;
  analystName: string | null;
  createdAt: string;
}

export interface Finding {
  id: number;
  assetId: number;
  assetTag: string;
  assetName: string;
  siteId: number;
  siteName: string;
  kind: string;
  level: GradeValue;
  previousLevel: GradeValue;
  summary: string;
  status: string;
  createdAt: string;
  /** When the capture behind the finding was taken. */
  takenAt: string | null;
  captureId: number | null;
  analysisId: number | null;
  loadPct: number | null;
  criticality: string | number | null;
  /** Oldest first. */
  verdicts: Verdict[];
}

/** GET /inspections/candidates: a finding that needs action and has no open inspection yet. */
export interface InspectionCandidate {
  findingId: number;
  assetId: number;
  assetTag: string;
  assetName: string;
  siteId: number;
  siteName: string;
  areaName: string;
  criticality: string | null;
  kind: string;
  level: GradeValue;
  summary: string;
  /** open | confirmed | remeasure */
  status: string;
  createdAt: string;
  suggestedPriority: Priority;
  /** Earlier findings of the same motor and kind still needing action, folded into this row (newest first). */
  earlierFindings: { id: number; level: GradeValue; status: string; createdAt: string }[];
  /** Open inspections already on the motor (any finding or none), soonest due first. */
  openInspections: { id: number; title: string; status: InspectionStatus; dueDate: string }[];
}

export type InspectionStatus = "planned" | "in_progress" | "done" | "cancelled";
export type Priority = "low" | "normal" | "high" | "urgent";

export interface InspectionEvent {
  id: number;
  at: string;
  /** created, status, rescheduled, reassigned, changed, attachment, … */
  kind: string;
  from: string | null;
  to: string | null;
  byId: number | null;
  byName: string | null;
  note: string | null;
  details?: unknown;
}

export interface Inspection {
  id: number;
  assetId: number;
  assetTag?: string;
  assetName?: string;
  siteName?: string;
  findingId: number | null;
  title: string;
  instructions: string | null;
  dueDate: string;
  assigneeId: number | null;
  assigneeName?: string | null;
  priority: Priority | string;
  status: InspectionStatus;
  outcome?: string | null;
  completionNote?: string | null;
  createdAt?: string;
  updatedAt?: string;
  overdue?: boolean;
  criticality?: string | null;
  completedAt?: string | null;
  /** Only on GET /inspections/:id. */
  events?: InspectionEvent[];
  attachments?: { id: number; fileName: string; contentType: string; size: number; captureId: number | null; createdAt: string; url: string }[];
}

export interface Person {
  id: number;
  name: string;
  role: Role;
}

export interface User extends SessionUser {
  active: boolean;
  invited: boolean;
  lastSignInAt: string | null;
  createdAt: string;
}

export interface Gateway {
  id: number;
  name: string;
  siteId: number;
  siteName?: string;
  createdAt?: string;
  lastSeenAt?: string | null;
  revokedAt?: string | null;
  active?: boolean;
}

/** `GET /calendar-feed`: the signed-in user's calendar subscription link, never its secret. */
export interface CalendarFeedStatus {
  /** "plan": every open inspection; "assigned": only those assigned to the user. */
  scope: "plan" | "assigned";
  link: { prefix: string; createdAt: string; lastUsedAt: string | null } | null;
}
/** `POST /calendar-feed`: a new link; `url` is shown this once. */
export interface IssuedCalendarFeed extends CalendarFeedStatus {
  token: string;
  url: string;
}

export interface CaughtMail {
  id: number;
  receivedAt: string;
  from: string;
  to: string;
  subject: string;
  text: string;
  attachments: { filename: string; contentType: string; size: number }[];
}
