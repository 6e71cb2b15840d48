import type { Knex } from "knex";
import { seedDemoUsers } from "./demo-users.ts";

/** The demo data, seeded idempotently by the start command. Later steps add the fleet scenario here. */
export async function seedDemo(db: Knex): Promise<void> {
  await seedDemoUsers(db);
}
