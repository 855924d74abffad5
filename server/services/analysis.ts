import { analyzeMatrix, MatrixInputError, type MatrixAnalysis } from "../../shared/demography";
import { buildMatrices, LifeCycleFormulaError, vitalRateSensitivities, type LifeCycle } from "../../shared/lifecycle";
import { lifeCycleDeltaMethod } from "../../shared/uncertainty";
import type { AnalyzeMatrixRequest, LifeCycleAnalysis } from "../../shared/schemas/life-cycles";
import { HttpError } from "../http/errors";


/** The core's input errors (non-square, NaN…) are the client's: a 400 naming the field. */
function coreAnalysis(input: Parameters<typeof analyzeMatrix>[0]): MatrixAnalysis {
  try {
    return analyzeMatrix(input);
  } catch (err) {
    if (err instanceof MatrixInputError) {
      throw new HttpError(400, err.message, "bad_request", [{ path: err.path.join("."), message: err.message }]);
    }
    throw err;
  }
}

export function analyzeBareMatrix(req: AnalyzeMatrixRequest): MatrixAnalysis {
  const { matrix, fertility } = req;
  const U = fertility ? matrix.map((row, i) => row.map((a, j) => Math.max(0, a - fertility[i]![j]!))) : undefined;
  return coreAnalysis({ A: matrix, U, F: fertility, stageNames: req.stages, initial: req.initial, projectionSteps: req.projectionSteps });
}

/**
 * Builds A, U and F from a life-cycle document and analyses them. A formula
 * that cannot be computed is the request's fault (`status` 400), or the stored
 * document's (422), with each problem tied to its arrow's field.
 */
export function analyzeLifeCycle(
  doc: LifeCycle,
  options: { initial?: number[]; projectionSteps?: number; status?: 400 | 422; field?: string } = {},
): LifeCycleAnalysis {
  const field = options.field ?? "document";
  if (doc.stages.length === 0) {
    throw new HttpError(options.status ?? 400, "The life cycle has no stages yet: add a stage to analyse it.", "bad_request", [{ path: `${field}.stages`, message: "Add at least one stage." }]);
  }
  const m = buildMatrices(doc);
  if (m.errors.length > 0) {
    const index = new Map(doc.transitions.map((t, i) => [t.id, i]));
    const fields = m.errors.map((e) => ({ path: `${field}.transitions.${index.get(e.transitionId)}.rate`, message: e.message }));
    throw new HttpError(options.status ?? 400, `The life cycle cannot be analysed: ${fields[0]!.message}`, options.status === 422 ? "unanalysable" : "bad_request", fields);
  }
  const analysis = coreAnalysis({ A: m.A, U: m.U, F: m.F, stageNames: m.stageNames, initial: options.initial, projectionSteps: options.projectionSteps });
  const vitalRates = analysis.sensitivity ? vitalRateSensitivities(doc, analysis.sensitivity, analysis.lambda) : [];
  return {
    ...analysis,
    stageIds: m.stageIds,
    census: doc.census,
    timeStepUnit: doc.timeStepUnit,
    matrices: { A: m.A, U: m.U, F: m.F },
    vitalRates,
    uncertainty: analysis.sensitivity ? deltaOrNull(doc, vitalRates.map((r) => r.sensitivity)) : null,
  };
}

/** The delta method, or null when a formula cannot be evaluated near the rates' values (the analysis above stands). */
function deltaOrNull(doc: LifeCycle, sensitivity: number[]) {
  try {
    return lifeCycleDeltaMethod(doc, sensitivity);
  } catch (err) {
    if (err instanceof LifeCycleFormulaError) return null;
    throw err;
  }
}
