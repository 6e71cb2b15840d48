import { rootKeys } from "../../../lib/query.ts";
import type { QueryParams } from "../../../lib/api.ts";

export const planKeys = {
  inspections: rootKeys.inspections,
  inspectionList: (filters: QueryParams) => [...rootKeys.inspections, "list", filters] as const,
  candidates: () => [...rootKeys.findings, "inspection-candidates"] as const,
  technicians: () => [...rootKeys.people, "technician"] as const,
  motorsForPicker: (q: string) => [...rootKeys.assets, "list", { q, pageSize: 50, sort: "tag" }] as const,
};
