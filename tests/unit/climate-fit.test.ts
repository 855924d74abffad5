import { describe, expect, it } from "vitest";
import { FIT_PARAMETERS, fitThermalResponse, modelJacobian, parseNumericPairs, responseValue } from "../../shared/climate";
import { createRandom } from "../../shared/demography";
import type { ThermalResponse } from "../../shared/lifecycle/thermal";

const SEEDS = [11, 2024, 31337, 424242, 9_000_001];

/** Synthetic measurements: the true curve at `temps` plus normal noise of SD `sd` (seeded). */
function synthetic(truth: ThermalResponse, temps: number[], sd: number, seed: number) {
  const rng = createRandom(seed);
  return { T: temps, y: temps.map((t) => responseValue(truth, t) + sd * rng.normal()) };
}
const grid = (from: number, to: number, n: number, reps = 1) => Array.from({ length: n * reps }, (_, i) => from + ((to - from) * (i % n)) / (n - 1));

const cases: { name: string; truth: ThermalResponse; temps: number[]; sd: number; Tref?: number }[] = [
  { name: "Boltzmann–Arrhenius", truth: { form: "arrhenius", appliesTo: "rate", valueAtReference: 0.8, activationEnergy: 0.65, referenceTemperature: 20 }, temps: grid(5, 30, 11, 2), sd: 0.05, Tref: 20 },
  {
    name: "Sharpe–Schoolfield",
    truth: { form: "schoolfield", appliesTo: "rate", valueAtReference: 1, activationEnergy: 0.6, referenceTemperature: 20, inactivationEnergy: 3.5, inactivationTemperature: 31 },
    temps: grid(6, 38, 17, 2),
    sd: 0.04,
    Tref: 20,
  },
  { name: "Gaussian–quadratic", truth: { form: "gaussian-quadratic", appliesTo: "rate", valueAtOptimum: 2, optimum: 24, width: 4, criticalMaximum: 33 }, temps: grid(8, 32.5, 15, 2), sd: 0.06 },
  { name: "Brière", truth: { form: "briere", appliesTo: "rate", coefficient: 2e-4, lower: 8, upper: 36 }, temps: grid(10, 35, 14, 2), sd: 0.01 },
];

describe("fitting a thermal response by nonlinear least squares", () => {
  for (const c of cases) {
    it(`recovers the ${c.name} parameters within 3 standard errors for each of 5 seeds`, () => {
      for (const seed of SEEDS) {
        const data = synthetic(c.truth, c.temps, c.sd, seed);
        const fit = fitThermalResponse(data.T, data.y, { form: c.truth.form, referenceTemperature: c.Tref });
        expect(fit.problem, `seed ${seed}`).toBeNull();
        expect(fit.converged).toBe(true);
        for (const e of fit.estimates) {
          const truth = (c.truth as unknown as Record<string, number>)[e.key]!;
          expect(e.se, `${e.key} seed ${seed}`).not.toBeNull();
          expect(Math.abs(e.estimate - truth), `${e.key} seed ${seed}: ${e.estimate} ± ${e.se} vs ${truth}`).toBeLessThanOrEqual(3 * e.se!);
        }
        // The residual SE estimates the noise SD (loosely: 30 points).
        expect(fit.sigma!).toBeGreaterThan(0.5 * c.sd);
        expect(fit.sigma!).toBeLessThan(1.6 * c.sd);
      }
    });
  }

  it("computes SEs as √diag((JᵀJ)⁻¹·RSS/(n−p)), matching the Arrhenius slope's SE from linear regression on noise-free-scale data", () => {
    // Independent check: with Arrhenius on a log scale the model is linear; here on the natural
    // scale we compare with a direct computation from an analytic Jacobian.
    const c = cases[0]!;
    const data = synthetic(c.truth, c.temps, c.sd, 5);
    const fit = fitThermalResponse(data.T, data.y, { form: "arrhenius", referenceTemperature: 20 });
    const [r0, E] = fit.estimates.map((e) => e.estimate) as [number, number];
    const k = 8.617333262e-5;
    // ∂r/∂r0 = exp(−(E/k)u), ∂r/∂E = −(u/k) r0 exp(−(E/k)u), u = 1/T − 1/T_ref (kelvin).
    const J = data.T.map((t) => {
      const u = 1 / (t + 273.15) - 1 / 293.15;
      const g = Math.exp(-(E / k) * u);
      return [g, -(u / k) * r0 * g];
    });
    const a = J.reduce((s, r) => s + r[0]! * r[0]!, 0);
    const b = J.reduce((s, r) => s + r[0]! * r[1]!, 0);
    const d = J.reduce((s, r) => s + r[1]! * r[1]!, 0);
    const det = a * d - b * b;
    const s2 = fit.rss / (fit.n - fit.p);
    expect(fit.estimates[0]!.se!).toBeCloseTo(Math.sqrt((d / det) * s2), 6);
    expect(fit.estimates[1]!.se!).toBeCloseTo(Math.sqrt((a / det) * s2), 6);
    const numeric = modelJacobian((p, T) => responseValue({ ...c.truth, valueAtReference: p[0]!, activationEnergy: p[1]! } as ThermalResponse, T), [r0, E], data.T, [1e-7, 1e-7]);
    numeric.forEach((row, i) => row.forEach((v, j) => expect(v).toBeCloseTo(J[i]![j]!, 5)));
  });

  it("reports a fit that does not converge, with the last estimate", () => {
    const c = cases[1]!;
    const data = synthetic(c.truth, c.temps, c.sd, 1);
    const fit = fitThermalResponse(data.T, data.y, { form: "schoolfield", referenceTemperature: 20, maxIterations: 1, start: { inactivationTemperature: 15, inactivationEnergy: 9 } });
    expect(fit.converged).toBe(false);
    expect(fit.problem).toMatch(/before reaching a least-squares optimum|edge of its allowed range|not separately identifiable/);
    expect(fit.estimates.every((e) => Number.isFinite(e.estimate) && e.se === null)).toBe(true);
  });

  it("needs more measurements than parameters", () => {
    expect(() => fitThermalResponse([10, 20, 30, 35], [1, 2, 3, 1], { form: "schoolfield" })).toThrow("The schoolfield form has 4 parameters to fit; give at least 5 measurements.");
    expect(FIT_PARAMETERS.briere.map((p) => p.key)).toEqual(["coefficient", "lower", "upper"]);
  });
});

describe("two-column CSV", () => {
  it("reads a header and numbers, with comma, semicolon or tab", () => {
    expect(parseNumericPairs("temperature,rate\n10,0.5\n20, 1.1\n\n", ["temperature", "value"])).toEqual({ ok: true, header: ["temperature", "rate"], x: [10, 20], y: [0.5, 1.1] });
    expect(parseNumericPairs("10;0.5\r\n20;1e-1", ["temperature", "value"])).toMatchObject({ ok: true, header: null, x: [10, 20], y: [0.5, 0.1] });
  });
  it("names the line and column of text in a numeric column", () => {
    expect(parseNumericPairs("T,r\n10,0.5\n15,high\nwarm,2", ["temperature", "value"])).toEqual({
      ok: false,
      issues: [
        { line: 3, column: 2, message: 'Line 3, column 2 (value): "high" is not a number.' },
        { line: 4, column: 1, message: 'Line 4, column 1 (temperature): "warm" is not a number.' },
      ],
    });
    expect(parseNumericPairs("T,r\n10,0.5,3", ["temperature", "value"])).toEqual({ ok: false, issues: [{ line: 2, message: "Line 2 has 3 columns; expected 2 (temperature, value)." }] });
    expect(parseNumericPairs("T,r\n", ["temperature", "value"])).toEqual({ ok: false, issues: [{ line: 1, message: "The file has no rows of numbers (temperature, value)." }] });
  });
});
