import type { Router } from "express";
import { RunCreateSchema } from "../../shared/schemas/runs";
import type { AppDeps } from "../app";
import { currentUser, roleCheck, studyAccess, uuidParam } from "../auth/authorize";
import { cancelRun, createRun, getRun, listRuns, studyOfRun } from "../runs/service";
import { studyOfLifeCycle } from "../services/life-cycles";

export function runRoutes(r: Router, deps: AppDeps): void {
  const { db } = deps;
  const lifeCycleRole = (role: "viewer" | "editor") => roleCheck(db, role, (req) => studyOfLifeCycle(db, uuidParam(req, "lifeCycleId")));
  const runRole = (role: "viewer" | "editor") => roleCheck(db, role, (req) => studyOfRun(db, uuidParam(req, "runId")));

  r.get("/life-cycles/:lifeCycleId/runs", lifeCycleRole("viewer"), async (req, res) => {
    res.json(await listRuns(db, uuidParam(req, "lifeCycleId")));
  });

  r.post("/life-cycles/:lifeCycleId/runs", lifeCycleRole("editor"), async (req, res) => {
    const request = RunCreateSchema.parse(req.body);
    const target = { studyId: studyAccess(res).studyId, lifeCycleId: uuidParam(req, "lifeCycleId") };
    res.status(201).json(await createRun(db, deps, target, currentUser(req).id, request));
  });

  r.get("/runs/:runId", runRole("viewer"), async (req, res) => {
    res.json(await getRun(db, uuidParam(req, "runId")));
  });

  r.post("/runs/:runId/cancel", runRole("editor"), async (req, res) => {
    res.json(await cancelRun(db, uuidParam(req, "runId"), currentUser(req).id));
  });
}
