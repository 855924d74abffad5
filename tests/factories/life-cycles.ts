import { LIFE_CYCLE_SCHEMA_VERSION, type LifeCycle } from "../../shared/lifecycle";

/**
 * A small stage-structured life cycle (juvenile, subadult, adult) with named
 * vital rates, invented for tests. Override any part.
 */
export function threeStageLifeCycle(overrides: Partial<LifeCycle> = {}): LifeCycle {
  return {
    stagewright: LIFE_CYCLE_SCHEMA_VERSION,
    name: "Three-stage test",
    census: "pre-breeding",
    timeStepUnit: "year",
    stages: [
      { id: "st_j", name: "Juvenile", position: { x: 0, y: 0 } },
      { id: "st_s", name: "Subadult", position: { x: 200, y: 0 } },
      { id: "st_a", name: "Adult", position: { x: 400, y: 0 } },
    ],
    rates: [
      { id: "vr_sj", name: "s_j", value: 0.3 },
      { id: "vr_ss", name: "s_s", value: 0.6 },
      { id: "vr_g", name: "g", value: 0.4 },
      { id: "vr_sa", name: "s_a", value: 0.85 },
      { id: "vr_f", name: "f", value: 1.6 },
    ],
    transitions: [
      { id: "tr_js", from: "st_j", to: "st_s", kind: "growth", rate: "s_j" },
      { id: "tr_ss", from: "st_s", to: "st_s", kind: "stasis", rate: "s_s * (1 - g)" },
      { id: "tr_sa", from: "st_s", to: "st_a", kind: "growth", rate: "s_s * g" },
      { id: "tr_aa", from: "st_a", to: "st_a", kind: "stasis", rate: "s_a" },
      { id: "tr_aj", from: "st_a", to: "st_j", kind: "reproduction", rate: "f" },
    ],
    ...overrides,
  };
}

/** The matrix the factory's formulas give (rows: to; columns: from). */
export const THREE_STAGE_MATRIX = [
  [0, 0, 1.6],
  [0.3, 0.6 * 0.6, 0],
  [0, 0.6 * 0.4, 0.85],
];
