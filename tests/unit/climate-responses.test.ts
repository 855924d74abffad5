import { describe, expect, it } from "vitest";
import { BOLTZMANN_EV, brentRoot, defaultResponse, goldenMaximum, q10, responseOptimum, responseSlope, responseValue } from "../../shared/climate";
import { checkThermalRules, ThermalResponseSchema, type ThermalResponse } from "../../shared/lifecycle/thermal";

const arrhenius = (E: number, r0 = 1, Tref = 20): ThermalResponse => ({ form: "arrhenius", appliesTo: "rate", activationEnergy: E, referenceTemperature: Tref, valueAtReference: r0 });

describe("Boltzmann–Arrhenius", () => {
  it("gives the ratio exp[(E/k)(1/293.15 − 1/303.15)] between 20 and 30 °C, a Q10 in the physiologists' 2–3", () => {
    // k = 8.617333262e-5 eV/K (CODATA 2018); formula: Gillooly et al. 2001, Science 293:2248.
    expect(BOLTZMANN_EV).toBe(8.617333262e-5);
    const expected = Math.exp((0.65 / 8.617333262e-5) * (1 / 293.15 - 1 / 303.15));
    const r = arrhenius(0.65);
    expect(responseValue(r, 30) / responseValue(r, 20)).toBeCloseTo(expected, 12);
    expect(q10(r, 20)).toBeCloseTo(expected, 12);
    // METHODS.md §3: ≈ 2.34 [derived]; Q10 of 2–3 is common practice among physiologists.
    expect(expected).toBeCloseTo(2.34, 2);
    expect(expected).toBeGreaterThan(2);
    expect(expected).toBeLessThan(3);
  });

  it("equals the rate at the reference temperature there, and rises without an optimum", () => {
    const r = arrhenius(0.65, 0.42, 15);
    expect(responseValue(r, 15)).toBe(0.42);
    expect(responseOptimum(r)).toBeNull();
    expect(responseValue(r, 16)).toBeGreaterThan(responseValue(r, 15));
  });
});

describe("Sharpe–Schoolfield (high-temperature inactivation only)", () => {
  // Schoolfield, Sharpe & Magnuson 1981 (J. theor. Biol. 88:719), the form of METHODS.md §3:
  // r(T) = r₀ e^{−(E/k)(1/T−1/T_ref)} / [1 + e^{(E_h/k)(1/T_h − 1/T)}], T in kelvin.
  const r: ThermalResponse = { form: "schoolfield", appliesTo: "rate", valueAtReference: 2, activationEnergy: 0.6, referenceTemperature: 20, inactivationEnergy: 3, inactivationTemperature: 30 };
  it("reproduces the published equation at chosen points", () => {
    const k = 8.617333262e-5;
    for (const T of [5, 20, 27.5, 30, 36]) {
      const TK = T + 273.15;
      const expected = (2 * Math.exp(-(0.6 / k) * (1 / TK - 1 / 293.15))) / (1 + Math.exp((3 / k) * (1 / 303.15 - 1 / TK)));
      expect(responseValue(r, T)).toBeCloseTo(expected, 12);
    }
    // At T = T_h the inactivation term is exactly 1 + e⁰ = 2 [derived].
    expect(responseValue(r, 30)).toBeCloseTo(responseValue({ ...arrhenius(0.6, 2) }, 30) / 2, 12);
  });
  it("peaks where the published optimum formula says", () => {
    // T_opt = E_h T_h / [E_h + k T_h ln(E_h/E − 1)] (METHODS.md §3 [memory]; re-derived from d ln r/dT = 0).
    const k = 8.617333262e-5;
    const Th = 303.15;
    const formula = (3 * Th) / (3 + k * Th * Math.log(3 / 0.6 - 1)) - 273.15;
    expect(responseOptimum(r)).toBeCloseTo(formula, 10);
    const numeric = goldenMaximum((T) => responseValue(r, T), 0, 45, 1e-9);
    expect(numeric.x).toBeCloseTo(formula, 5);
    expect(Math.abs(responseSlope(r, formula))).toBeLessThan(1e-7);
  });
});

describe("Gaussian–quadratic performance curve", () => {
  // Deutsch et al. 2008 (PNAS 105:6668): exp{−[(T−T_opt)/(2σ)]²} below T_opt,
  // 1 − [(T−T_opt)/(T_opt−CT_max)]² above, 0 at and beyond CT_max.
  const r: ThermalResponse = { form: "gaussian-quadratic", appliesTo: "rate", valueAtOptimum: 1.5, optimum: 24, width: 4, criticalMaximum: 32 };
  it("reproduces the published equation at chosen points", () => {
    expect(responseValue(r, 24)).toBe(1.5);
    // T_opt − 2σ: exp(−1) of the peak [derived].
    expect(responseValue(r, 16)).toBeCloseTo(1.5 * Math.exp(-1), 14);
    // Half-way to CT_max: 1 − 0.25 = 0.75 of the peak [derived].
    expect(responseValue(r, 28)).toBeCloseTo(1.5 * 0.75, 14);
    expect(responseValue(r, 32)).toBe(0);
    expect(responseValue(r, 40)).toBe(0);
  });
  it("has its optimum at T_opt, with a smooth top", () => {
    expect(responseOptimum(r)).toBe(24);
    expect(goldenMaximum((T) => responseValue(r, T), 0, 40, 1e-9).x).toBeCloseTo(24, 5);
    expect(Math.abs(responseSlope(r, 24))).toBeLessThan(1e-9);
  });
});

describe("Brière", () => {
  // Brière et al. 1999 (Environ. Entomol. 28:22): r(T) = a T (T − T₀) √(T_L − T) on (T₀, T_L), else 0; T in °C.
  const r: ThermalResponse = { form: "briere", appliesTo: "rate", coefficient: 2e-4, lower: 10, upper: 35 };
  it("reproduces the published equation at chosen points", () => {
    // By hand: 2e-4 · 25 · 15 · √10 = 0.075 · 3.16227766… = 0.237170824…
    expect(responseValue(r, 25)).toBeCloseTo(0.2371708245, 9);
    expect(responseValue(r, 10)).toBe(0);
    expect(responseValue(r, 35)).toBe(0);
    expect(responseValue(r, 5)).toBe(0);
    expect(responseValue(r, 36)).toBe(0);
  });
  it("peaks where the published optimum formula says", () => {
    // [4T_L + 3T₀ + √(16T_L² + 9T₀² − 16T₀T_L)]/10 (METHODS.md §3 [memory]; re-derived from d ln r/dT = 0).
    const formula = (4 * 35 + 3 * 10 + Math.sqrt(16 * 35 * 35 + 9 * 100 - 16 * 10 * 35)) / 10;
    expect(responseOptimum(r)).toBeCloseTo(formula, 12);
    expect(goldenMaximum((T) => responseValue(r, T), 10, 35, 1e-9).x).toBeCloseTo(formula, 5);
  });
});

describe("parameter checks", () => {
  const problems = (rate: { name: string; value: number }, thermal: unknown) => {
    const parsed = ThermalResponseSchema.safeParse(thermal);
    if (!parsed.success) return parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`);
    const out: string[] = [];
    checkThermalRules({ rates: [{ ...rate, thermal: parsed.data }] }, (path, message) => out.push(`${path.join(".")}: ${message}`));
    return out;
  };
  const f = { name: "f", value: 1.6 };
  it("rejects an activation energy ≤ 0", () => {
    expect(problems(f, arrhenius(0))).toEqual(["activationEnergy: The activation energy is above 0 eV (typically 0.2–1.2 eV for the rise)."]);
    expect(problems(f, arrhenius(-0.3))[0]).toMatch(/^activationEnergy:/);
  });
  it("rejects an upper limit below the lower limit, an optimum outside the limits, and inactivation below activation, naming the rate", () => {
    expect(problems(f, { form: "briere", appliesTo: "rate", coefficient: 1e-4, lower: 30, upper: 12 })).toEqual([
      'rates.0.thermal.upper: The thermal response of "f": the upper limit (12 °C) must lie above the lower limit (30 °C).',
    ]);
    expect(problems(f, { form: "gaussian-quadratic", appliesTo: "rate", valueAtOptimum: 1, optimum: 30, width: 3, criticalMaximum: 28 })).toEqual([
      'rates.0.thermal.criticalMaximum: The thermal response of "f": the critical maximum (28 °C) must lie above the optimum (30 °C).',
    ]);
    expect(problems(f, { form: "schoolfield", appliesTo: "rate", valueAtReference: 1, activationEnergy: 0.7, referenceTemperature: 20, inactivationEnergy: 0.5, inactivationTemperature: 30 })[0]).toMatch(
      /^rates\.0\.thermal\.inactivationEnergy: The thermal response of "f": the inactivation energy \(0\.5 eV\) must exceed the activation energy/,
    );
  });
  it("rejects a hazard response on a rate that is not a probability", () => {
    expect(problems(f, { ...arrhenius(0.65), appliesTo: "hazard" })[0]).toMatch(/^rates\.0\.thermal\.appliesTo: The thermal response of "f" applies to a hazard/);
    expect(problems({ name: "s_j", value: 0.3 }, { ...arrhenius(0.65), appliesTo: "hazard" })).toEqual([]);
  });
  it("rejects a Brière lower limit below 0 °C and temperatures outside −60…80 °C", () => {
    expect(problems(f, { form: "briere", appliesTo: "rate", coefficient: 1e-4, lower: -2, upper: 30 })[0]).toMatch(/^lower: The lower temperature limit is at least 0 °C/);
    expect(problems(f, arrhenius(0.65, 1, 300))[0]).toBe("referenceTemperature: The reference temperature lies between -60 and 80 °C.");
  });
  it("rejects a reversed or absurdly wide λ(T) range and years that skip", () => {
    const out: string[] = [];
    const issue = (path: (string | number)[], message: string) => out.push(`${path.join(".")}: ${message}`);
    checkThermalRules({ rates: [], climate: { range: { min: 30, max: 10 } } }, issue);
    checkThermalRules({ rates: [], climate: { range: { min: -60, max: 80 } } }, issue);
    checkThermalRules({ rates: [], climate: { trajectory: { kind: "series", points: [{ year: 2020, temperature: 9 }, { year: 2022, temperature: 9.5 }] } } }, issue);
    expect(out).toEqual([
      "climate.range.max: The highest temperature (10 °C) must lie above the lowest (30 °C).",
      "climate.range.max: A temperature range spans at most 100 °C; this one spans 140 °C.",
      "climate.trajectory.points.1.year: Years follow one another: 2020 is followed by 2022.",
    ]);
  });
  it("defaults leave the rate unchanged at 20 °C", () => {
    for (const form of ["arrhenius", "schoolfield", "gaussian-quadratic", "briere"] as const) {
      const fecundity = defaultResponse(form, { value: 1.6, probability: false });
      expect(problems(f, fecundity)).toEqual([]);
      expect(responseValue(fecundity, 20)).toBeCloseTo(1.6, 10);
    }
    const survival = defaultResponse("arrhenius", { value: 0.3, probability: true });
    expect(survival.appliesTo).toBe("hazard");
    expect(Math.exp(-responseValue(survival, 20))).toBeCloseTo(0.3, 12);
  });
});

describe("Brent's root finder", () => {
  it("finds √2 to machine precision and refuses a bracket without a sign change", () => {
    const root = brentRoot((x) => x * x - 2, 0, 2, { ftol: 0, xtol: 0 });
    expect(root.x).toBeCloseTo(Math.SQRT2, 15);
    expect(() => brentRoot((x) => x * x + 1, -1, 1)).toThrow(/sign change/);
  });
});
