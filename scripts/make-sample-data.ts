// npm run sample-data: (re)write the capture files in sample-data/ and their README from fixed seeds
// (server/seed/samples.ts). Byte-identical on every run.
//   --out DIR   write elsewhere (default sample-data/)
//   --reseed    also rebuild the demo history in the database (DATABASE_URL, default the npm start cluster, which
//               must be running): everything recorded on the demo motors (captures, analyses, findings, verdicts,
//               inspections, uploads included) is removed and the history is seeded again, dated from now.
import path from "node:path";
import { fileURLToPath } from "node:url";
import { writeSampleData } from "../server/seed/samples.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const args = process.argv.slice(2);
const outAt = args.indexOf("--out");
const out = outAt >= 0 && args[outAt + 1] ? path.resolve(args[outAt + 1]) : path.join(ROOT, "sample-data");

const hashes = await writeSampleData(out);
for (const [name, hash] of hashes) console.log(`${hash.slice(0, 16)}  ${path.relative(process.cwd(), path.join(out, name))}`);

if (args.includes("--reseed")) {
  const { loadConfig } = await import("../server/config.ts");
  const { createKnex, migrateLatest } = await import("../server/db.ts");
  const { createBlobStore } = await import("../server/blob/index.ts");
  const { removeDemo } = await import("../server/seed/history.ts");
  const { seedDemo } = await import("../server/seed/index.ts");
  const config = loadConfig();
  const db = createKnex(config.databaseUrl);
  try {
    await migrateLatest(db);
    const blob = await createBlobStore(config);
    await removeDemo(db, { blob });
    await seedDemo(db, { blob });
  } finally {
    await db.destroy();
  }
}
