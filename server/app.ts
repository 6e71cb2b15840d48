import express, { type Router } from "express";
import helmet from "helmet";
import compression from "compression";
import cookieParser from "cookie-parser";
import { pinoHttp } from "pino-http";
import pino from "pino";
import path from "node:path";
import fs from "node:fs";
import type { AppContext } from "./context.ts";
import { sessionMiddleware } from "./auth.ts";
import { errorHandler, notFound } from "./errors.ts";
import { guardedRouter, requirePermission, routeRegistry } from "./http.ts";
import { authRoutes } from "./routes/auth.ts";
import { userRoutes } from "./routes/users.ts";
import { outboxRoutes } from "./routes/outbox.ts";
import { auditRoutes } from "./routes/audit.ts";
import { assetMotorModelRoutes, motorModelRouter } from "./routes/motor-model.ts";
import { gatewayRoutes } from "./routes/gateways.ts";
import { inspectionRoutes } from "./routes/inspections.ts";
import { fleetRoutes } from "./routes/fleet.ts";
import { siteRoutes } from "./routes/sites.ts";
import { assetRoutes } from "./routes/assets.ts";
import { captureRoutes } from "./routes/captures.ts";
import { analysisRoutes } from "./routes/analyses.ts";
import { findingRoutes } from "./routes/findings.ts";
import { calendarFeedRoutes } from "./routes/calendar-feed.ts";
import { redactFeedUrl } from "./plan/feed-links.ts";

/** Route modules, in mount order. Each returns an express Router whose routes declare their permission. */
const ROUTE_MODULES: ((ctx: AppContext) => Router)[] = [authRoutes, userRoutes, outboxRoutes, auditRoutes, siteRoutes, assetRoutes, assetMotorModelRoutes, captureRoutes, analysisRoutes, findingRoutes, gatewayRoutes, inspectionRoutes, calendarFeedRoutes, fleetRoutes];

export function createApp(ctx: AppContext, opts: { staticDir?: string } = {}) {
  const app = express();
  app.disable("x-powered-by");
  app.set("trust proxy", "loopback");
  app.use(helmet());
  app.use(compression());
  if (ctx.config.env !== "test")
    app.use(
      pinoHttp({
        // Buffered, asynchronous writes: synchronous logging to a pipe cost a third of upload throughput.
        logger: pino(pino.destination({ sync: false, minLength: 4096 })),
        autoLogging: { ignore: (req) => !req.url?.startsWith("/api") },
        quietReqLogger: true,
        serializers: { req: (r) => ({ method: r.method, url: redactFeedUrl(r.url) }), res: (r) => ({ status: r.statusCode }) },
      }),
    );
  app.use(express.json({ limit: "2mb" }));
  app.use(cookieParser());
  app.use(sessionMiddleware(ctx.db, ctx.config));

  const health = guardedRouter("/api");
  health.get("/health", "public", async (_req, res) => {
    await ctx.db.raw("select 1");
    res.json({ ok: true });
  });
  app.use("/api", health.router);
  for (const mod of ROUTE_MODULES) app.use("/api", mod(ctx));

  for (const p of ["/api/motor-model/evaluate", "/api/motor-model/estimate"])
    if (!routeRegistry.some((r) => r.path === p)) routeRegistry.push({ method: "post", path: p, permission: "motor-model.use" });
  app.use("/api/motor-model", requirePermission("motor-model.use"), motorModelRouter());

  app.use("/api", (_req, _res, next) => next(notFound("No such API route.")));

  const staticDir = opts.staticDir;
  if (staticDir && fs.existsSync(path.join(staticDir, "index.html"))) {
    app.use(express.static(staticDir, { index: false, maxAge: "1h" }));
    app.get("/{*splat}", (_req, res) => res.sendFile(path.join(staticDir, "index.html")));
  }
  app.use(errorHandler);
  return app;
}
