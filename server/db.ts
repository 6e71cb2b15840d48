import knexFactory, { type Knex } from "knex";
import path from "node:path";
import { fileURLToPath } from "node:url";

export const MIGRATIONS_DIR = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../migrations");

export function createKnex(databaseUrl: string, pool = { min: 0, max: 10 }): Knex {
  return knexFactory({
    client: "pg",
    connection: databaseUrl,
    pool,
    migrations: { directory: MIGRATIONS_DIR, loadExtensions: [".ts"] },
  });
}

export async function migrateLatest(knex: Knex): Promise<void> {
  await knex.migrate.latest({ directory: MIGRATIONS_DIR, loadExtensions: [".ts"] });
}

/** Create the database named in the URL if it does not exist yet (connects to the "postgres" database). */
export async function ensureDatabase(databaseUrl: string): Promise<void> {
  const url = new URL(databaseUrl);
  const name = decodeURIComponent(url.pathname.replace(/^\//, ""));
  if (!name || name === "postgres") return;
  url.pathname = "/postgres";
  const admin = createKnex(url.toString(), { min: 0, max: 1 });
  try {
    const found = await admin.raw("select 1 from pg_database where datname = ?", [name]);
    if (found.rows.length === 0) await admin.raw(`create database "${name.replace(/"/g, '""')}"`);
  } finally {
    await admin.destroy();
  }
}
