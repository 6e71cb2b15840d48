import type { Knex } from "knex";
import type { Config } from "./config.ts";
import type { Mailer } from "./mail/mailer.ts";

/** What every route module gets: the database, configuration and outside services. */
export interface AppContext {
  db: Knex;
  config: Config;
  mailer: Mailer;
  /** Optional services the capture pipeline adds (blob store, job queue, live events). */
  services: Record<string, unknown>;
}
