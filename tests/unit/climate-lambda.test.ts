import { describe, expect, it } from "vitest";
import { EDGE_TOLERANCE, lambdaCurve, lambdaSlope, projectTrajectory, responseValue, simulateTrajectoryReplicates, summariseReplicates, thermalModel, trajectoryTemperatures } from "../../shared/climate";
import { dominantEigen } from "../../shared/demography";
import { buildMatrices, type LifeCycle } from "../../shared/lifecycle";
import type { ThermalResponse } from "../../shared/lifecycle/thermal";
import { warmableLifeCycle } from "../factories/climate";
import { threeStageLifeCycle } from "../factories/life-cycles";

const warmable = (extra: Record<string, ThermalResponse> = {}) => warmableLifeCycle(extra);

/** λ at T by the independent route: rate overrides → buildMatrices → dominantEigen. */
function lambdaByOverrides(doc: LifeCycle, T: number): number {
  const overrides: Record<string, number> = {};
  for (const r of doc.rates) {
    const th = r.thermal;
    if (!th) continue;
    const v = responseValue(th, T);
    overrides[r.id] = th.appliesTo === "hazard" ? Math.exp(-v) : r.value <= 1 && r.value >= 0 ? Math.min(1, v) : v;
  }
  return dominantEigen(buildMatrices(doc, overrides).A).lambda;
}

describe("λ(T)", () => {
  const doc = warmable();
  const model = thermalModel(doc);

  it("equals the λ of the matrix built with the rates at T", () => {
    for (const T of [0, 12.5, 21, 27, 33]) expect(model.lambdaAt(T)).toBeCloseTo(lambdaByOverrides(doc, T), 12);
  });

  it("keeps the warm-started λ solver exact over jumps in temperature, and for a reducible life cycle", () => {
    // Independent route: dominantEigen on the matrix built from overrides. Order shuffled so warm starts come from far away.
    const temps = [3, 35, 3.1, 20, -5, 20.05, 31, 0, 27.3, 12];
    for (const T of temps) expect(Math.abs(model.lambdaAt(T) - lambdaByOverrides(doc, T))).toBeLessThan(1e-12 * lambdaByOverrides(doc, T));
    // Post-reproductive stage with high survival makes the matrix reducible (a zero in the Perron vector).
    const base = warmableLifeCycle();
    const reducible: LifeCycle = {
      ...base,
      stages: [...base.stages, { id: "st_p", name: "Post-breeder", position: { x: 600, y: 0 } }],
      transitions: [...base.transitions, { id: "tr_ap", from: "st_a", to: "st_p", kind: "growth", rate: 0.05 }, { id: "tr_pp", from: "st_p", to: "st_p", kind: "stasis", rate: 0.99 }],
    };
    const rm = thermalModel(reducible);
    for (const T of [10, 20, 33, 21]) expect(Math.abs(rm.lambdaAt(T) - lambdaByOverrides(reducible, T))).toBeLessThan(1e-12);
  });

  it("finds a persistence window whose edges have λ = 1 within 1e-9", () => {
    const curve = lambdaCurve(model, { min: 0, max: 40, points: 200 });
    expect(curve.window).toHaveLength(1);
    const [w] = curve.window;
    expect(w!.lower).not.toBeNull();
    expect(w!.upper).not.toBeNull();
    for (const e of [w!.lower!, w!.upper!]) {
      expect(Math.abs(model.lambdaAt(e.temperature) - 1)).toBeLessThanOrEqual(EDGE_TOLERANCE);
      expect(Math.abs(e.lambda - 1)).toBeLessThanOrEqual(EDGE_TOLERANCE);
    }
    expect(w!.lower!.side).toBe("lower");
    expect(w!.upper!.side).toBe("upper");
    // Inside λ ≥ 1, just outside λ < 1.
    expect(model.lambdaAt((w!.from + w!.to) / 2)).toBeGreaterThan(1);
    expect(model.lambdaAt(w!.from - 0.01)).toBeLessThan(1);
    expect(model.lambdaAt(w!.to + 0.01)).toBeLessThan(1);
    // The optimum lies inside the window, above every grid value.
    expect(curve.optimum!.temperature).toBeGreaterThan(w!.from);
    expect(curve.optimum!.temperature).toBeLessThan(w!.to);
    expect(curve.optimum!.lambda).toBeGreaterThanOrEqual(Math.max(...curve.lambda));
    expect(curve.optimum!.atBoundary).toBe(false);
  });

  it("reports an open window edge when λ ≥ 1 runs to the end of the range, and none when λ < 1 throughout", () => {
    const curve = lambdaCurve(model, { min: 18, max: 40, points: 50 });
    const inside = lambdaCurve(model, { min: 0, max: 40, points: 200 }).window[0]!;
    expect(curve.window[0]!.lower).toBeNull();
    expect(curve.window[0]!.from).toBe(18);
    expect(curve.window[0]!.upper!.temperature).toBeCloseTo(inside.upper!.temperature, 9);
    const cold = lambdaCurve(model, { min: -10, max: 2, points: 20 });
    expect(cold.window).toEqual([]);
  });

  it("gives dλ/dT by the chain rule that matches a finite difference of λ(T)", () => {
    for (const T of [8, 17, 24, 29]) {
      const s = lambdaSlope(model, T);
      const h = 1e-4;
      const fd = (model.lambdaAt(T + h) - model.lambdaAt(T - h)) / (2 * h);
      expect(s.slope).toBeCloseTo(fd, 6);
      expect(s.contributions.map((c) => c.name)).toEqual(["s_j", "f"]);
      expect(s.contributions.reduce((a, c) => a + c.contribution, 0)).toBeCloseTo(s.slope, 14);
    }
    // Warmer water kills more juveniles: that rate's contribution is negative.
    expect(lambdaSlope(model, 17).contributions[0]!.contribution).toBeLessThan(0);
  });

  it("clamps a probability pushed above 1 and says where", () => {
    const hot = warmable({ s_a: { form: "arrhenius", appliesTo: "rate", activationEnergy: 0.65, referenceTemperature: 20, valueAtReference: 0.85 } });
    const curve = lambdaCurve(thermalModel(hot), { min: 10, max: 35, points: 60 });
    const clamp = curve.clamped.find((c) => c.name === "s_a");
    expect(clamp).toBeDefined();
    expect(clamp!.worst).toBeGreaterThan(1);
    expect(clamp!.from).toBeGreaterThan(20);
    expect(clamp!.from).toBeLessThan(23);
    const sa = curve.rates.find((r) => r.name === "s_a")!;
    expect(Math.max(...sa.values)).toBe(1);
  });

  it("takes λ at 200 temperatures for a life cycle without thermal responses as the constant λ", () => {
    const plain = threeStageLifeCycle();
    const curve = lambdaCurve(thermalModel(plain), { min: 0, max: 30, points: 200 });
    const lambda = dominantEigen(buildMatrices(plain).A).lambda;
    for (const l of curve.lambda) expect(l).toBeCloseTo(lambda, 13);
  });
});

describe("warming trajectory", () => {
  const doc = warmable();
  const model = thermalModel(doc);

  it("grows as λ^t at a constant temperature, since it starts in the stable structure", () => {
    const years = [2030, 2031, 2032, 2033, 2034];
    const p = projectTrajectory(model, years, years.map(() => 18), 500);
    const lambda = model.lambdaAt(18);
    p.total.forEach((N, t) => expect(N).toBeCloseTo(500 * lambda ** t, 8));
    expect(p.firstYearBelowOne).toBe(lambda < 1 ? 2030 : null);
  });

  it("names the first year whose λ_t falls below 1 under a trend", () => {
    const curve = lambdaCurve(model, { min: 0, max: 40, points: 200 });
    const upper = curve.window[0]!.upper!.temperature;
    const { years, temperatures } = trajectoryTemperatures({ kind: "trend", startYear: 2025, baseline: 20, trendPerDecade: 2, sd: 0, years: 60 });
    expect(temperatures[10]).toBeCloseTo(22, 12);
    const p = projectTrajectory(model, years, temperatures, 1000);
    const expectedIndex = temperatures.findIndex((T) => T > upper);
    expect(p.firstYearBelowOne).toBe(years[expectedIndex]);
    p.annualLambda.forEach((l, i) => expect(l).toBeCloseTo(model.lambdaAt(temperatures[i]!), 12));
  });

  it("replicates with SD 0 repeat the deterministic projection; chunks depend only on (seed, stream)", () => {
    const { years, temperatures } = trajectoryTemperatures({ kind: "trend", startYear: 2025, baseline: 19, trendPerDecade: 1.5, sd: 0, years: 30 });
    const det = projectTrajectory(model, years, temperatures, 800);
    const flat = summariseReplicates([simulateTrajectoryReplicates(model, temperatures, 0, 800, 5, 7, 0)], 30, 100);
    flat.quantiles.forEach((q) => q.values.forEach((v, t) => expect(v).toBeCloseTo(det.total[t]!, 8)));
    const a = simulateTrajectoryReplicates(model, temperatures, 1, 800, 20, 99, 3);
    const b = simulateTrajectoryReplicates(model, temperatures, 1, 800, 20, 99, 3);
    const c = simulateTrajectoryReplicates(model, temperatures, 1, 800, 20, 99, 4);
    expect(a).toEqual(b);
    expect(a.totals).not.toEqual(c.totals);
  });

  it("draws year-to-year temperatures with the trend's mean and the SD asked for", () => {
    // Monte Carlo check: 4000 draws per year, mean within 4 standard errors (σ/√R).
    const temps = Array.from({ length: 5 }, (_, i) => 18 + i * 0.2);
    const s = summariseReplicates([simulateTrajectoryReplicates(model, temps, 1.5, 100, 4000, 2026, 0)], 5, null);
    s.temperatureMean.forEach((m, t) => expect(Math.abs(m - temps[t]!)).toBeLessThan((4 * 1.5) / Math.sqrt(4000)));
    // SD of a normal sample: SE ≈ σ/√(2(R−1)).
    s.temperatureSd.forEach((sd) => expect(Math.abs(sd - 1.5)).toBeLessThan((4 * 1.5) / Math.sqrt(2 * 3999)));
    expect(s.belowThreshold).toBeNull();
  });
});
