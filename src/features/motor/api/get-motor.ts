import { queryOptions, useQuery } from "@tanstack/react-query";
import { apiGet, type Paged } from "../../../lib/api.ts";
import type { AssetDetail, Capture, CaptureDetail, Finding, Inspection } from "../../../lib/contracts.ts";
import type { MotorCurves, KeyPoints } from "../../../engine/motor-model/index.ts";
import type { ModelFlag, ModelOperatingPoint, MotorModelInput } from "../../../engine/motor-model/types.ts";
import type { AssetMotorModelBody } from "../../../shared/schemas/motor-model.ts";
import { motorKeys } from "./keys.ts";

export const motorQueryOptions = (id: number) =>
  queryOptions({ queryKey: motorKeys.detail(id), queryFn: ({ signal }) => apiGet<AssetDetail>(`/assets/${id}`, undefined, signal) });
export const useMotor = (id: number) => useQuery(motorQueryOptions(id));

export interface TrendPoint {
  takenAt: string;
  captureId: number;
  analysisId: number;
  loadPct: number | null;
  slip: number | null;
  rpm: number | null;
  sidebandDb: number | null;
  rotorGrade: string | null;
  rotorAssessable?: boolean | null;
  vibrationRms: number | null;
  vibrationZone: string | null;
  supplyHz: number | null;
}
/**
 * GET /assets/:id/trend. The answer holds at most `limit` points, the newest of the range, oldest first; `truncated`
 * says the range holds more (`total` of them) and `shownFrom` is the date of the oldest point shown.
 */
export interface TrendAnswer {
  points: TrendPoint[];
  truncated: boolean;
  total: number;
  limit: number;
  shownFrom: string | null;
}
export const trendQueryOptions = (id: number) =>
  queryOptions({ queryKey: motorKeys.trend(id), queryFn: ({ signal }) => apiGet<TrendAnswer>(`/assets/${id}/trend`, undefined, signal) });
export const useTrend = (id: number) => useQuery(trendQueryOptions(id));

/** One circuit value of the motor model and where it came from (server/captures/motor-model.ts). */
export interface CircuitValue {
  name: string;
  label: string;
  meaning: string;
  value: number | null;
  unit: "Ω" | "W";
  source: "nameplate estimate" | "no-load test" | "locked-rotor test" | "entered";
  basis: string;
}

export type { ModelOperatingPoint };

export interface MotorModelResponse {
  origin: "nameplate-estimate" | "measured";
  measured: { method: "circuit" | "tests"; entered: AssetMotorModelBody; notes: string[]; savedAt: string; savedBy: { id: number; name: string } | null; connection: string; frequencyHz: number } | null;
  input: MotorModelInput;
  sources: Record<string, string>;
  circuit: CircuitValue[];
  assumptions: string[];
  curves: MotorCurves;
  keyPoints: KeyPoints;
  operatingPoints: ModelOperatingPoint[];
  currentTolerancePct: number;
}
export const motorModelQueryOptions = (id: number) =>
  queryOptions({
    queryKey: motorKeys.model(id),
    queryFn: ({ signal }) => apiGet<MotorModelResponse>(`/assets/${id}/motor-model`, undefined, signal),
    structuralSharing: false,
  });
export const useMotorModel = (id: number) => useQuery(motorModelQueryOptions(id));

export const motorCapturesQueryOptions = (assetId: number, page: number) =>
  queryOptions({
    queryKey: motorKeys.captures(assetId, page),
    queryFn: ({ signal }) => apiGet<Paged<Capture>>("/captures", { assetId, page, pageSize: 10, sort: "-takenAt" }, signal),
  });
export const useMotorCaptureHistory = (assetId: number, page: number) => useQuery(motorCapturesQueryOptions(assetId, page));

export const motorFindingsQueryOptions = (assetId: number) =>
  queryOptions({
    queryKey: motorKeys.findings(assetId),
    queryFn: ({ signal }) => apiGet<Paged<Finding>>("/findings", { assetId, sort: "-createdAt", pageSize: 50 }, signal),
  });
export const useMotorFindings = (assetId: number) => useQuery(motorFindingsQueryOptions(assetId));

export const motorInspectionsQueryOptions = (assetId: number) =>
  queryOptions({
    queryKey: motorKeys.inspections(assetId),
    queryFn: ({ signal }) => apiGet<Paged<Inspection>>("/inspections", { assetId, sort: "-dueDate", pageSize: 50 }, signal),
  });
export const useMotorInspections = (assetId: number) => useQuery(motorInspectionsQueryOptions(assetId));

/** A capture with its analysis (same key and answer as the capture page's, so they share the cache). */
export const captureDetailQueryOptions = (captureId: number) =>
  queryOptions({
    queryKey: motorKeys.capture(captureId),
    queryFn: ({ signal }) => apiGet<CaptureDetail>(`/captures/${captureId}`, undefined, signal),
  });
export const useCaptureDetail = (captureId: number | null) => useQuery({ ...captureDetailQueryOptions(captureId ?? NaN), enabled: captureId !== null });
