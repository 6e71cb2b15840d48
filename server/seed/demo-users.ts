import type { Knex } from "knex";
import { hashPassword } from "../auth.ts";
import type { Role } from "../permissions.ts";

// Demo sign-ins of the invented operator Northwend Utilities (example.* addresses are reserved for examples).
export const DEMO_PASSWORD = "barhound-demo";
export const DEMO_USERS: { role: Role; email: string; name: string }[] = [
  { role: "technician", email: "ines.varga@northwend.example", name: "Ines Varga" },
  { role: "analyst", email: "tobias.renn@northwend.example", name: "Tobias Renn" },
  { role: "planner", email: "maren.holt@northwend.example", name: "Maren Holt" },
  { role: "manager", email: "jonah.achterberg@northwend.example", name: "Jonah Achterberg" },
  { role: "admin", email: "priya.castell@northwend.example", name: "Priya Castell" },
];

/** Insert the demo users once; a second run changes nothing. */
export async function seedDemoUsers(db: Knex): Promise<void> {
  const hash = await hashPassword(DEMO_PASSWORD);
  for (const u of DEMO_USERS) {
    await db("users").insert({ ...u, password_hash: hash, active: true }).onConflict("email").ignore();
  }
}
