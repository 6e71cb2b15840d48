import http from "node:http";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { loadConfig, type Config } from "./config.ts";
import { createKnex, migrateLatest } from "./db.ts";
import { createApp } from "./app.ts";
import { createMailer } from "./mail/mailer.ts";
import { startMailFake } from "./mail/fake-smtp.ts";
import type { AppContext } from "./context.ts";
import { installRealtime } from "./realtime.ts";
import { installPipeline } from "./captures/pipeline.ts";
import { removeStaleUploadTemp } from "./captures/upload.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");

export interface RunningServer {
  port: number;
  ctx: AppContext;
  close(): Promise<void>;
}

/** The mail fake lives in this process, so when its usual port is taken any free loopback port will do. */
async function startMailFakeOnFreePort(db: ReturnType<typeof createKnex>, port: number) {
  try {
    return await startMailFake({ db, port, host: "127.0.0.1" });
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== "EADDRINUSE") throw err;
    const fake = await startMailFake({ db, port: 0, host: "127.0.0.1" });
    console.log(`mail fake: port ${port} is in use, catching mail on 127.0.0.1:${fake.port} instead`);
    return fake;
  }
}

/** Start the HTTP server (API, static client) and, in development, the local mail fake. */
export async function startServer(config: Config = loadConfig(), opts: { staticDir?: string } = {}): Promise<RunningServer> {
  const db = createKnex(config.databaseUrl);
  await migrateLatest(db);
  const fake = config.mailFake ? await startMailFakeOnFreePort(db, config.smtp.port) : null;
  if (fake) config.smtp.port = fake.port;
  const ctx: AppContext = { db, config, mailer: createMailer(config), services: {} };
  await installPipeline(ctx); // blob store + job queue: services.blob, services.queue
  // Upload temp folders a crash left behind (the route removes its own before answering).
  const staleUploads = await removeStaleUploadTemp(config.dataDir).catch((err) => (console.error("[upload] temp sweep failed:", (err as Error).message), []));
  if (staleUploads.length) console.log(`removed ${staleUploads.length} upload temp folder(s) left by an earlier run`);
  installRealtime(ctx); // socket.io (live updates, gateway streams): onHttpServer + onClose hooks, services.publish
  const app = createApp(ctx, { staticDir: opts.staticDir ?? path.join(ROOT, "dist") });
  const server = http.createServer(app);
  const hooks = (ctx.services.onHttpServer as ((s: http.Server) => Promise<void> | void)[] | undefined) ?? [];
  for (const hook of hooks) await hook(server);
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(config.port, config.host, () => resolve());
  });
  const port = (server.address() as { port: number }).port;
  return {
    port,
    ctx,
    async close() {
      const closers = (ctx.services.onClose as (() => Promise<void>)[] | undefined) ?? [];
      for (const c of closers) await c();
      await new Promise<void>((r) => server.close(() => r()));
      server.closeAllConnections?.();
      await fake?.close();
      await db.destroy();
    },
  };
}

if (process.argv[1] && fileURLToPath(import.meta.url) === path.resolve(process.argv[1])) {
  const running = await startServer();
  console.log(`barhound server listening on http://localhost:${running.port}`);
  const stop = async () => {
    await running.close().catch(() => {});
    process.exit(0);
  };
  process.on("SIGINT", stop);
  process.on("SIGTERM", stop);
}
