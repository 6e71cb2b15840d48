import { rootKeys } from "../../../lib/query.ts";

export const reviewKeys = {
  all: rootKeys.review,
  list: (query: Record<string, unknown>) => [...rootKeys.review, "list", query] as const,
};
