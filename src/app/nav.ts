import type { Permission } from "../lib/contracts.ts";

export interface NavItem {
  to: string;
  label: string;
  /** Shown only when the role has every one of these. */
  requires: Permission[];
}

// One list, in display order. My work needs both field permissions, so only the technician sees it.
export const NAV_ITEMS: NavItem[] = [
  { to: "/my-work", label: "My work", requires: ["inspections.work", "captures.upload"] },
  { to: "/review", label: "Review", requires: ["review.read"] },
  { to: "/plan", label: "Plan", requires: ["inspections.plan"] },
  { to: "/fleet", label: "Fleet", requires: ["fleet.read"] },
  { to: "/motors", label: "Motors", requires: ["fleet.read"] },
  { to: "/upload", label: "Upload", requires: ["captures.upload"] },
  { to: "/calculator", label: "Calculator", requires: ["motor-model.use"] },
  { to: "/admin", label: "Admin", requires: ["users.manage"] },
  { to: "/outbox", label: "Outbox", requires: ["outbox.read"] },
];

export function visibleNav(permissions: readonly string[]): NavItem[] {
  return NAV_ITEMS.filter((item) => item.requires.every((p) => permissions.includes(p)));
}
