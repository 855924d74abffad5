import type { LifeCycle } from "../../shared/lifecycle";
import { threeStageLifeCycle } from "./life-cycles";

/**
 * The factory's three-stage life cycle with every optional part of the
 * document filled in (invented values): uncertainty of each kind (SE, CI,
 * counts k of n, an explicit distribution, a correlation), thermal responses
 * of all four forms, the Climate settings and two management scenarios (rate
 * and matrix-entry changes, costs, achievable amounts). The fuzzer mutates it,
 * so every part of the document's schema is reached.
 */
export function fullLifeCycle(overrides: Partial<LifeCycle> = {}): LifeCycle {
  const base = threeStageLifeCycle();
  const extra: Record<string, Partial<LifeCycle["rates"][number]>> = {
    s_j: {
      counts: { k: 30, n: 100 },
      source: "Invented pitfall-trap recaptures",
      thermal: { form: "arrhenius", appliesTo: "hazard", activationEnergy: 0.65, referenceTemperature: 18, valueAtReference: -Math.log(0.3) },
    },
    s_s: { se: 0.05, scale: "probability", thermal: { form: "gaussian-quadratic", appliesTo: "rate", optimum: 17, width: 6, criticalMaximum: 29, valueAtOptimum: 0.6 } },
    g: { ci: { lower: 0.3, upper: 0.5, level: 0.95 }, unit: "per year" },
    s_a: { se: 0.03, thermal: { form: "schoolfield", appliesTo: "hazard", activationEnergy: 0.5, referenceTemperature: 15, valueAtReference: -Math.log(0.85), inactivationEnergy: 3, inactivationTemperature: 30 } },
    f: { distribution: { family: "gamma", shape: 64, rate: 40 }, unit: "female eggs per female", thermal: { form: "briere", appliesTo: "rate", coefficient: 0.004, lower: 2, upper: 32 } },
  };
  return {
    ...base,
    name: "Three-stage with every part",
    notes: "Invented for tests.",
    stages: base.stages.map((s, i) => (i === 0 ? { ...s, color: "#2f6b5a", notes: "Eggs and larvae" } : s)),
    rates: base.rates.map((r) => ({ ...r, ...extra[r.name] })),
    transitions: base.transitions.map((t) => (t.id === "tr_aa" ? { ...t, notes: "Adults stay adults" } : t)),
    correlations: [{ a: "vr_ss", b: "vr_sa", r: 0.4 }],
    scenarios: [
      {
        id: "sc_fence",
        name: "Fence the road",
        action: "A drift fence along the road crossing",
        cost: 12,
        changes: [{ id: "ch_sa", target: { kind: "rate", rateId: "vr_sa" }, op: "multiply", value: 1.05, achievable: 1.1 }],
      },
      {
        id: "sc_head",
        name: "Head-start juveniles",
        cost: 30,
        changes: [
          { id: "ch_js", target: { kind: "entry", from: "st_j", to: "st_s" }, op: "add", value: 0.1, achievable: 0.2 },
          { id: "ch_f", target: { kind: "rate", rateId: "vr_f" }, op: "set", value: 1.8 },
        ],
      },
    ],
    climate: { range: { min: 0, max: 30 }, trajectory: { kind: "trend", startYear: 2026, years: 30, baseline: 14, trendPerDecade: 0.4, sd: 0.8 } },
    ...overrides,
  };
}
