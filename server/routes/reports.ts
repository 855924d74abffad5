import type { Router } from "express";
import { fileStem } from "../../shared/export/csv";
import { ReportQuerySchema } from "../../shared/schemas/report";
import type { AppDeps } from "../app";
import { currentUser, roleCheck, studyAccess, studyRole, uuidParam } from "../auth/authorize";
import { buildOpenApiDocument } from "../openapi/document";
import { reportPdf } from "../report/pdf";
import { studyOfLifeCycle } from "../services/life-cycles";
import { buildReport } from "../services/report";
import { exportStudy } from "../services/study-export";

/** Reports, the Study zip and the API's own description. */
export function reportRoutes(r: Router, deps: AppDeps): void {
  const { db, config } = deps;
  const lifeCycleViewer = roleCheck(db, "viewer", (req) => studyOfLifeCycle(db, uuidParam(req, "lifeCycleId")));

  r.get("/openapi.json", (_req, res) => {
    res.json(buildOpenApiDocument({ includeDev: config.mailOutbox, publicUrl: config.publicUrl }));
  });

  r.get("/life-cycles/:lifeCycleId/report", lifeCycleViewer, async (req, res) => {
    const { snapshot } = ReportQuerySchema.parse(req.query);
    res.json(await buildReport(db, uuidParam(req, "lifeCycleId"), { snapshotId: snapshot }));
  });

  r.get("/life-cycles/:lifeCycleId/report.pdf", lifeCycleViewer, async (req, res) => {
    const { snapshot, paper } = ReportQuerySchema.parse(req.query);
    const report = await buildReport(db, uuidParam(req, "lifeCycleId"), { snapshotId: snapshot });
    const pdf = await reportPdf(report, paper);
    res
      .type("application/pdf")
      .set("Content-Disposition", `attachment; filename="${fileStem(report.lifeCycle.name)}-report.pdf"`)
      .send(pdf);
  });

  r.get("/studies/:studyId/export.zip", studyRole(db, "viewer"), async (req, res) => {
    const { fileName, zip } = await exportStudy(db, studyAccess(res).studyId, currentUser(req).id, config.exportLimitBytes);
    res.type("application/zip").set("Content-Disposition", `attachment; filename="${fileName}"`).send(Buffer.from(zip));
  });
}
