import type { Knex } from "knex";
import { seedDemoUsers } from "./demo-users.ts";
import { seedExtraPeople } from "./people.ts";
import { seedFleet } from "./fleet.ts";
import { seedHistory, type HistoryOptions, type HistorySummary } from "./history.ts";
import type { BlobStore } from "../blob/store.ts";
import { createBlobStore } from "../blob/index.ts";
import { loadConfig } from "../config.ts";

export interface SeedOptions {
  /** Where the kept demo recordings go (default: the configured store, as the server uses). */
  blob?: BlobStore;
  now?: Date;
  threads?: number;
  /** Skip the six months of history (people and fleet only). */
  history?: boolean;
  log?: HistoryOptions["log"];
}

/**
 * The demo data, seeded idempotently by the start command: the role sign-ins and extra staff, the Northwend
 * scenario's sites, areas, motors and measurement points, and six months of analysed captures with findings,
 * verdicts and inspections. A second run changes nothing (and takes well under a second).
 */
export async function seedDemo(db: Knex, opts: SeedOptions = {}): Promise<HistorySummary | null> {
  await seedDemoUsers(db);
  await seedExtraPeople(db);
  await seedFleet(db);
  if (opts.history === false) return null;
  const blob = opts.blob ?? (await createBlobStore(loadConfig()));
  return seedHistory(db, { blob, now: opts.now, threads: opts.threads, log: opts.log ?? ((line) => console.log(line)) });
}
