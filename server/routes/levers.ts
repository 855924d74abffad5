import type { Router } from "express";
import { LeversRequestSchema, LtreRequestSchema } from "../../shared/schemas/levers";
import type { AppDeps } from "../app";
import { signedIn } from "../auth/authorize";
import { leversOfLifeCycle, ltreOfLifeCycles } from "../services/levers";

/**
 * Levers of a life cycle and LTRE between two, computed on the documents sent
 * (the editor sends what it shows, saved or not), like `POST /analyze`.
 */
export function leverRoutes(r: Router, _deps: AppDeps): void {
  r.post("/levers", signedIn, (req, res) => {
    res.json(leversOfLifeCycle(LeversRequestSchema.parse(req.body ?? {})));
  });

  r.post("/ltre", signedIn, (req, res) => {
    const { reference, comparison } = LtreRequestSchema.parse(req.body ?? {});
    res.json(ltreOfLifeCycles(reference, comparison));
  });
}
