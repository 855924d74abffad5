import type { Router } from "express";
import { ClimateFitRequestSchema, ClimateLambdaRequestSchema, ClimateTrajectoryRequestSchema } from "../../shared/schemas/climate";
import type { AppDeps } from "../app";
import { signedIn } from "../auth/authorize";
import { climateFit, climateLambda, climateTrajectory } from "../services/climate";
import { parseDocument } from "../services/life-cycles";

/** Stateless Climate computations, like /analyze: for the editor's unsaved document and for scripts. */
export function climateRoutes(r: Router, _deps: AppDeps): void {
  r.post("/climate/lambda", signedIn, async (req, res) => {
    const { document, ...options } = ClimateLambdaRequestSchema.parse(req.body);
    res.json(climateLambda(parseDocument(document), options));
  });

  r.post("/climate/fit", signedIn, async (req, res) => {
    res.json(climateFit(ClimateFitRequestSchema.parse(req.body)));
  });

  r.post("/climate/trajectory", signedIn, async (req, res) => {
    const { document, trajectory, initialTotal } = ClimateTrajectoryRequestSchema.parse(req.body);
    res.json(climateTrajectory(parseDocument(document), trajectory, initialTotal));
  });
}
