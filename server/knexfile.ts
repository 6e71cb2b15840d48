// For the knex command line: npm run knex -- migrate:make NAME -x ts
import { loadConfig } from "./config.ts";
import { MIGRATIONS_DIR } from "./db.ts";

const config = loadConfig();
export default {
  client: "pg",
  connection: config.databaseUrl,
  migrations: { directory: MIGRATIONS_DIR, loadExtensions: [".ts"], extension: "ts" },
};
