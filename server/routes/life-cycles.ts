import type { Router } from "express";
import {
  LifeCycleCreateSchema,
  LifeCycleDuplicateSchema,
  LifeCycleUpdateSchema,
  parseAnalyzeRequest,
  SnapshotCreateSchema,
  SnapshotRestoreSchema,
} from "../../shared/schemas/life-cycles";
import type { AppDeps } from "../app";
import { currentUser, roleCheck, signedIn, studyAccess, studyRole, uuidParam } from "../auth/authorize";
import { analyzeBareMatrix, analyzeLifeCycle } from "../services/analysis";
import {
  createLifeCycle,
  deleteLifeCycle,
  duplicateLifeCycle,
  getLifeCycle,
  listDeletedLifeCycles,
  listLifeCycles,
  parseDocument,
  restoreDeletedLifeCycle,
  studyOfLifeCycle,
  updateLifeCycle,
} from "../services/life-cycles";
import { createSnapshot, getSnapshot, lifeCycleOfSnapshot, listSnapshots, restoreSnapshot } from "../services/snapshots";

export function lifeCycleRoutes(r: Router, { db }: AppDeps): void {
  const lifeCycleRole = (role: Parameters<typeof studyRole>[1]) => roleCheck(db, role, (req) => studyOfLifeCycle(db, uuidParam(req, "lifeCycleId")));
  const deletedLifeCycleRole = (role: Parameters<typeof studyRole>[1]) =>
    roleCheck(db, role, (req) => studyOfLifeCycle(db, uuidParam(req, "lifeCycleId"), { deleted: true }));
  const snapshotRole = (role: Parameters<typeof studyRole>[1]) =>
    roleCheck(db, role, async (req) => {
      const lifeCycleId = await lifeCycleOfSnapshot(db, uuidParam(req, "snapshotId"));
      return lifeCycleId ? studyOfLifeCycle(db, lifeCycleId) : null;
    });
  const lifeCycleId = (req: Parameters<typeof uuidParam>[0]) => uuidParam(req, "lifeCycleId");

  r.get("/studies/:studyId/life-cycles", studyRole(db, "viewer"), async (_req, res) => {
    res.json(await listLifeCycles(db, studyAccess(res).studyId));
  });

  r.post("/studies/:studyId/life-cycles", studyRole(db, "editor"), async (req, res) => {
    res.status(201).json(await createLifeCycle(db, studyAccess(res).studyId, currentUser(req).id, LifeCycleCreateSchema.parse(req.body)));
  });

  r.get("/studies/:studyId/deleted-life-cycles", studyRole(db, "editor"), async (_req, res) => {
    res.json(await listDeletedLifeCycles(db, studyAccess(res).studyId));
  });

  r.post("/life-cycles/:lifeCycleId/undelete", deletedLifeCycleRole("editor"), async (req, res) => {
    res.json(await restoreDeletedLifeCycle(db, lifeCycleId(req), currentUser(req).id));
  });

  r.get("/life-cycles/:lifeCycleId", lifeCycleRole("viewer"), async (req, res) => {
    res.json(await getLifeCycle(db, lifeCycleId(req)));
  });

  r.put("/life-cycles/:lifeCycleId", lifeCycleRole("editor"), async (req, res) => {
    const { version, document } = LifeCycleUpdateSchema.parse(req.body);
    res.json(await updateLifeCycle(db, lifeCycleId(req), currentUser(req).id, version, document));
  });

  r.delete("/life-cycles/:lifeCycleId", lifeCycleRole("editor"), async (req, res) => {
    await deleteLifeCycle(db, lifeCycleId(req), currentUser(req).id);
    res.status(204).end();
  });

  r.post("/life-cycles/:lifeCycleId/duplicate", lifeCycleRole("editor"), async (req, res) => {
    const { name } = LifeCycleDuplicateSchema.parse(req.body ?? {});
    res.status(201).json(await duplicateLifeCycle(db, lifeCycleId(req), currentUser(req).id, name));
  });

  r.get("/life-cycles/:lifeCycleId/analysis", lifeCycleRole("viewer"), async (req, res) => {
    const { document } = await getLifeCycle(db, lifeCycleId(req));
    res.json(analyzeLifeCycle(document, { status: 422 }));
  });

  r.get("/life-cycles/:lifeCycleId/snapshots", lifeCycleRole("viewer"), async (req, res) => {
    res.json(await listSnapshots(db, lifeCycleId(req)));
  });

  r.post("/life-cycles/:lifeCycleId/snapshots", lifeCycleRole("editor"), async (req, res) => {
    const { message } = SnapshotCreateSchema.parse(req.body);
    res.status(201).json(await createSnapshot(db, lifeCycleId(req), currentUser(req).id, message));
  });

  r.get("/snapshots/:snapshotId", snapshotRole("viewer"), async (req, res) => {
    res.json(await getSnapshot(db, uuidParam(req, "snapshotId")));
  });

  r.post("/life-cycles/:lifeCycleId/snapshots/:snapshotId/restore", lifeCycleRole("editor"), async (req, res) => {
    const { version } = SnapshotRestoreSchema.parse(req.body);
    res.json(await restoreSnapshot(db, lifeCycleId(req), uuidParam(req, "snapshotId"), currentUser(req).id, version));
  });

  // Stateless analysis for scripts (and the editor's live preview): a bare matrix or a whole document.
  r.post("/analyze", signedIn, async (req, res) => {
    const input = parseAnalyzeRequest(req.body);
    res.json(
      input.kind === "document"
        ? analyzeLifeCycle(parseDocument(input.document), { initial: input.initial, projectionSteps: input.projectionSteps })
        : analyzeBareMatrix(input),
    );
  });
}
