// Analysis versions of a capture: every stored analysis (a re-analysis after a nameplate fix keeps the older
// ones) and one version's full result, so an earlier result can be seen and compared with the current one.
import type { AppContext } from "../context.ts";
import { guardedRouter } from "../http.ts";
import { notFound } from "../errors.ts";
import { idParam } from "../captures/paging.ts";
import { captureExists, listAnalysisVersions, loadAnalysisVersion } from "../captures/analysis-versions.ts";

export function analysisRoutes(ctx: AppContext) {
  const r = guardedRouter("/api");
  const { db } = ctx;

  r.get("/captures/:id/analyses", "fleet.read", async (req, res) => {
    const id = idParam(req.params.id, "capture");
    if (!(await captureExists(db, id))) throw notFound("No such capture.");
    res.json({ items: await listAnalysisVersions(db, id) });
  });

  r.get("/captures/:id/analyses/:analysisId", "fleet.read", async (req, res) => {
    const id = idParam(req.params.id, "capture");
    if (!(await captureExists(db, id))) throw notFound("No such capture.");
    const analysisId = idParam(req.params.analysisId, "analysis of this capture");
    const analysis = await loadAnalysisVersion(db, id, analysisId);
    if (!analysis) throw notFound("No such analysis of this capture.");
    res.json(analysis);
  });

  return r.router;
}
