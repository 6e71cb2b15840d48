import { z } from "zod";
import type { AppContext } from "../context.ts";
import { guardedRouter } from "../http.ts";
import { notFound, parseOr400 } from "../errors.ts";
import { loadFleetHealth } from "../reports/fleet-data.ts";
import { renderSiteReport } from "../reports/site-report.ts";
import { toCsv } from "../plan/csv.ts";

// Fleet health for the dashboard, its CSV export (one row per motor) and the printable site report.

const idParam = z.coerce.number().int().positive();
const siteQuery = z.object({ siteId: idParam.optional() });

export function fleetRoutes(ctx: AppContext) {
  const { db } = ctx;
  const r = guardedRouter("/api");

  const siteOr404 = async (siteId: number | undefined) => {
    if (siteId && !(await db("sites").where({ id: siteId }).first("id"))) throw notFound("No such site.");
  };

  r.get("/fleet", "fleet.read", async (req, res) => {
    const { siteId } = parseOr400(siteQuery, req.query);
    await siteOr404(siteId);
    res.json(await loadFleetHealth(db, { siteId }));
  });

  r.get("/fleet.csv", "reports.read", async (req, res) => {
    const { siteId } = parseOr400(siteQuery, req.query);
    await siteOr404(siteId);
    const fleet = await loadFleetHealth(db, { siteId });
    const csv = toCsv(
      [
        "site_code", "site", "area", "motor_tag", "motor_name", "criticality", "rated_kw", "rotor_grade", "sideband_db",
        "load_pct", "vibration_rms_mm_s", "vibration_zone", "measured_at", "open_inspections", "overdue_inspections",
      ],
      fleet.motors.map((m) => [
        m.siteCode, m.siteName, m.areaName, m.tag, m.name, m.criticality, m.ratedKw, m.gradeLabel, round(m.sidebandDb, 1),
        round(m.loadPct, 1), round(m.vibrationRms, 2), m.vibrationZone, m.takenAt, m.openInspections, m.overdueInspections,
      ]),
    );
    res.type("text/csv; charset=utf-8").attachment(siteId ? `fleet-site-${siteId}.csv` : "fleet.csv").send(csv);
  });

  r.get("/sites/:id/report", "reports.read", async (req, res) => {
    const siteId = parseOr400(idParam, req.params.id);
    await siteOr404(siteId);
    const fleet = await loadFleetHealth(db, { siteId });
    res.type("text/html; charset=utf-8").set("Cache-Control", "no-store").send(renderSiteReport(fleet, { generatedBy: req.user!.name }));
  });

  return r.router;
}

const round = (v: number | null, digits: number) => (v === null ? null : Number(v.toFixed(digits)));
