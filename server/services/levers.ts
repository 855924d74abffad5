import type { LifeCycle } from "../../shared/lifecycle";
import { breakEvenTable, compareScenarios, LeverError, leverModel, lifeCycleLtre, rankLevers } from "../../shared/levers";
import type { LeversRequest, LeversResponse, LtreResponse } from "../../shared/schemas/levers";
import { HttpError } from "../http/errors";
import { parseDocument } from "./life-cycles";

/** A life cycle that cannot be used for levers is the request's fault: a 400 naming the field. */
function asBadRequest(err: unknown, field: string): never {
  if (err instanceof LeverError) {
    const path = [field, ...err.path].join(".");
    throw new HttpError(400, err.message, "bad_request", [{ path, message: err.message }]);
  }
  throw err;
}

const scenariosOf = (doc: LifeCycle) => doc.scenarios ?? [];

/** Scenario comparison, lever ranking and (unless asked not to) break-even values of one life cycle. */
export function leversOfLifeCycle(req: LeversRequest): LeversResponse {
  const doc = parseDocument(req.document);
  try {
    const model = leverModel(doc);
    const scenarios = scenariosOf(doc);
    return {
      comparison: compareScenarios(doc, scenarios),
      ranking: rankLevers(model, { relativeChange: req.relativeChange, scenarios }),
      breakEven: req.breakEven ? breakEvenTable(model, { target: req.target }) : null,
      timeStepUnit: doc.timeStepUnit,
    };
  } catch (err) {
    return asBadRequest(err, "document");
  }
}

/** Fixed-design LTRE of `comparison` against `reference`. */
export function ltreOfLifeCycles(reference: unknown, comparison: unknown): LtreResponse {
  const ref = parseDocument(reference, "reference");
  const cmp = parseDocument(comparison, "comparison");
  try {
    return lifeCycleLtre(ref, cmp);
  } catch (err) {
    if (err instanceof LeverError && err.path[0] === "comparison") {
      throw new HttpError(400, err.message, "bad_request", [{ path: err.path.join("."), message: err.message }]);
    }
    return asBadRequest(err, "reference");
  }
}
