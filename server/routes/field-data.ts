import type { RequestHandler, Router } from "express";
import multer from "multer";
import { CountsAnalysisQuerySchema, DatasetRenameSchema, FateAnalysisSettingsSchema, MAX_UPLOAD_BYTES, RunOnDatasetSchema } from "../../shared/schemas/field-data";
import type { AppDeps } from "../app";
import { currentUser, roleCheck, studyAccess, studyRole, uuidParam } from "../auth/authorize";
import { HttpError } from "../http/errors";
import { unstorableTextError } from "../http/storable-text";
import { createRun, listDatasetRuns } from "../runs/service";
import {
  checkDatasetFile,
  countsAnalysis,
  createDataset,
  datasetFile,
  deleteDataset,
  fateAnalysis,
  getDataset,
  listDatasets,
  previewOptions,
  previewUpload,
  renameDataset,
  startLifeCycle,
  studyOfDataset,
  uploadRequest,
} from "../services/field-data";

const MB = MAX_UPLOAD_BYTES / (1024 * 1024);

/** One CSV file in memory (≤ 20 MB) plus small text fields; multer's own errors become readable 4xx answers. */
function oneFile(): RequestHandler {
  const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: MAX_UPLOAD_BYTES, files: 1, fields: 10, fieldSize: 200_000 } }).single("file");
  return (req, res, next) => {
    upload(req, res, (err: unknown) => {
      // The form's text fields, parsed only now: the same check as every JSON body's (server/http/storable-text.ts).
      if (!err) return next(unstorableTextError(req.body) ?? undefined);
      if (err instanceof multer.MulterError) {
        if (err.code === "LIMIT_FILE_SIZE") return next(new HttpError(413, `The file is larger than ${MB} MB, the most one upload may hold. Split it by site or by period.`, "payload_too_large", [{ path: "file", message: `At most ${MB} MB.` }]));
        const field = err.field ?? "file";
        return next(new HttpError(400, `${field}: ${err.message}.`, "bad_request", [{ path: field, message: err.message }]));
      }
      // Anything else multer's form parser throws (no boundary, a truncated or malformed part) is a broken request, not a server fault.
      const message = err instanceof Error ? err.message : "unreadable form";
      next(new HttpError(400, `The upload is not a well-formed multipart form (${message}). Send the CSV as the "file" field.`, "bad_request", [{ path: "file", message }]));
    });
  };
}

export function fieldDataRoutes(r: Router, deps: AppDeps): void {
  const { db } = deps;
  const datasetRole = (role: "viewer" | "editor") => roleCheck(db, role, (req) => studyOfDataset(db, uuidParam(req, "datasetId")));

  r.get("/studies/:studyId/datasets", studyRole(db, "viewer"), async (_req, res) => {
    res.json(await listDatasets(db, studyAccess(res).studyId));
  });

  r.post("/studies/:studyId/datasets/preview", studyRole(db, "editor"), oneFile(), async (req, res) => {
    res.json(await previewUpload(req.file, previewOptions(req.body ?? {})));
  });

  r.post("/studies/:studyId/datasets/check", studyRole(db, "editor"), oneFile(), async (req, res) => {
    res.json(await checkDatasetFile(req.file, uploadRequest(req.body ?? {})));
  });

  r.post("/studies/:studyId/datasets", studyRole(db, "editor"), oneFile(), async (req, res) => {
    res.status(201).json(await createDataset(db, studyAccess(res).studyId, currentUser(req).id, req.file, uploadRequest(req.body ?? {})));
  });

  r.get("/datasets/:datasetId", datasetRole("viewer"), async (req, res) => {
    res.json(await getDataset(db, uuidParam(req, "datasetId")));
  });

  r.patch("/datasets/:datasetId", datasetRole("editor"), async (req, res) => {
    res.json(await renameDataset(db, uuidParam(req, "datasetId"), currentUser(req).id, DatasetRenameSchema.parse(req.body)));
  });

  r.delete("/datasets/:datasetId", datasetRole("editor"), async (req, res) => {
    await deleteDataset(db, uuidParam(req, "datasetId"), currentUser(req).id);
    res.status(204).end();
  });

  r.get("/datasets/:datasetId/file", datasetRole("viewer"), async (req, res) => {
    const f = await datasetFile(db, uuidParam(req, "datasetId"));
    res.attachment(f.fileName).type("text/csv").send(f.content);
  });

  r.get("/datasets/:datasetId/counts-analysis", datasetRole("viewer"), async (req, res) => {
    res.json(await countsAnalysis(db, uuidParam(req, "datasetId"), CountsAnalysisQuerySchema.parse(req.query)));
  });

  r.get("/datasets/:datasetId/fate-analysis", datasetRole("viewer"), async (req, res) => {
    res.json(await fateAnalysis(db, uuidParam(req, "datasetId"), FateAnalysisSettingsSchema.parse(req.query)));
  });

  r.post("/datasets/:datasetId/life-cycles", datasetRole("editor"), async (req, res) => {
    res.status(201).json(await startLifeCycle(db, uuidParam(req, "datasetId"), currentUser(req).id, req.body));
  });

  r.get("/datasets/:datasetId/runs", datasetRole("viewer"), async (req, res) => {
    res.json(await listDatasetRuns(db, uuidParam(req, "datasetId")));
  });

  r.post("/datasets/:datasetId/runs", datasetRole("editor"), async (req, res) => {
    const request = RunOnDatasetSchema.parse(req.body);
    const target = { studyId: studyAccess(res).studyId, lifeCycleId: null, datasetId: uuidParam(req, "datasetId") };
    res.status(201).json(await createRun(db, deps, target, currentUser(req).id, request));
  });
}
