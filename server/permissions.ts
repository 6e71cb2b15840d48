// The permission matrix: which role may do what. Every API route names one of these permissions
// (see server/http.ts); the role × route test walks this table. Pure module: the client reads it via /api/me.

export const ROLES = ["technician", "analyst", "planner", "manager", "admin"] as const;
export type Role = (typeof ROLES)[number];

const ALL = ROLES;

export const PERMISSIONS = {
  /** Read one's own session, use the engineer's calculator. */
  "session": ALL,
  "motor-model.use": ALL,
  /** Sites, areas, motors, measurement points, captures, analyses, spectra, trends, findings, inspections: read. */
  "fleet.read": ALL,
  "captures.upload": ["technician", "analyst", "admin"],
  "captures.requeue": ["analyst", "admin"],
  "analyses.reanalyse": ["analyst", "admin"],
  "verdicts.write": ["analyst"],
  "review.read": ["analyst", "admin"],
  "inspections.plan": ["planner"],
  "inspections.work": ["technician", "planner"],
  "reports.read": ["manager", "planner", "admin"],
  /** Own calendar feed link (server/plan/feed-links.ts): the open plan for reports.read, a technician's own inspections. */
  "calendar.subscribe": ["technician", "planner", "manager", "admin"],
  "assets.write": ["admin"],
  "sites.write": ["admin"],
  "gateways.manage": ["admin"],
  "users.manage": ["admin"],
  "outbox.read": ["admin"],
  "audit.read": ["admin", "manager"],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

export function can(role: Role | undefined | null, permission: Permission): boolean {
  if (!role) return false;
  return (PERMISSIONS[permission] as readonly Role[]).includes(role);
}

export function permissionsOf(role: Role): Permission[] {
  return (Object.keys(PERMISSIONS) as Permission[]).filter((p) => can(role, p));
}

export function isRole(value: unknown): value is Role {
  return typeof value === "string" && (ROLES as readonly string[]).includes(value);
}
