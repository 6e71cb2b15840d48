import type { Knex } from "knex";
import { hashPassword } from "../auth.ts";
import type { Role } from "../permissions.ts";
import { DEMO_PASSWORD, DEMO_USERS } from "./demo-users.ts";

// More invented Northwend Utilities staff, so the inspection plan has several assignees and the review queue two
// analysts. Same demo password as the five role sign-ins in demo-users.ts (which stay unchanged).
export const EXTRA_DEMO_USERS: { role: Role; email: string; name: string }[] = [
  { role: "technician", email: "kasimir.doyle@northwend.example", name: "Kasimir Doyle" },
  { role: "technician", email: "aurelie.mbeki@northwend.example", name: "Aurélie Mbeki" },
  { role: "analyst", email: "hana.sorvik@northwend.example", name: "Hana Sorvik" },
];

/** Every demo person: the five role sign-ins first, then the extra staff. */
export const ALL_DEMO_USERS = [...DEMO_USERS, ...EXTRA_DEMO_USERS];

/** Insert the extra staff once; a second run changes nothing. */
export async function seedExtraPeople(db: Knex): Promise<void> {
  const missing = [];
  for (const u of EXTRA_DEMO_USERS) if (!(await db("users").where({ email: u.email }).first("id"))) missing.push(u);
  if (!missing.length) return;
  const hash = await hashPassword(DEMO_PASSWORD);
  for (const u of missing) await db("users").insert({ ...u, password_hash: hash, active: true }).onConflict("email").ignore();
}

/** Demo user ids by e-mail (all of them must exist). */
export async function demoUserIds(db: Knex | Knex.Transaction): Promise<Map<string, number>> {
  const rows = await db("users").whereIn("email", ALL_DEMO_USERS.map((u) => u.email)).select("id", "email");
  return new Map(rows.map((r) => [r.email as string, r.id as number]));
}
