// Life history from A = U + F, projection and transient indices, on small
// models whose answers follow by hand from the definitions (Caswell 2001
// ch. 5; Neubert & Caswell 1997; Stott, Townley & Hodgson 2011).
import { describe, expect, it } from "vitest";
import { analyzeMatrix, lifeHistory, project, transientIndices } from "../../shared/demography";
import { LESLIE_PRE } from "./demography-fixtures";

describe("reaching reproduction and the conditional age at first reproduction", () => {
  // Juvenile (stasis 0.2, → subadult 0.3), subadult (stasis 0.5, → adult 0.2),
  // adult (stasis 0.8, fertility 5). Only the adult column of F is positive.
  const U = [
    [0.2, 0, 0],
    [0.3, 0.5, 0],
    [0, 0.2, 0.8],
  ];
  const F = [
    [0, 0, 5],
    [0, 0, 0],
    [0, 0, 0],
  ];
  const out = lifeHistory({ U, F, stageNames: ["juvenile", "subadult", "adult"] });
  const lh = out.lifeHistory;

  it("the adult is the only reproductive stage", () => {
    expect(out.reason).toBeNull();
    expect(lh?.reproductiveStages).toEqual([2]);
  });

  it("probability of reaching a reproductive stage", () => {
    // [derived] p_sub = 0.2/(1 − 0.5) = 0.4; p_juv = 0.3 · 0.4/(1 − 0.2) = 0.15; p_adult = 1.
    const p = lh?.probabilityOfReproducing as number[];
    expect(Math.abs((p[0] as number) - 0.15)).toBeLessThanOrEqual(1e-15);
    expect(Math.abs((p[1] as number) - 0.4)).toBeLessThanOrEqual(1e-15);
    expect(p[2]).toBe(1);
  });

  it("mean age at first reproduction, given that it happens (starting stage = age 0)", () => {
    // [derived] Time in a stage with stasis s is geometric with mean 1/(1 − s), and
    // conditioning on success does not change it here: from subadult 1/(1 − 0.5) = 2;
    // from juvenile 1/(1 − 0.2) + 2 = 3.25; an adult is already reproductive (0).
    const age = lh?.meanAgeAtFirstReproduction as number[];
    expect(Math.abs((age[0] as number) - 3.25)).toBeLessThanOrEqual(1e-14);
    expect(Math.abs((age[1] as number) - 2)).toBeLessThanOrEqual(1e-14);
    expect(age[2]).toBe(0);
  });

  it("life expectancy counts the current interval: η = 1ᵀ(I − U)⁻¹", () => {
    // [derived] adult: 1/(1 − 0.8) = 5; subadult: 1/(1 − 0.5) · (1 + 0.2 · 5) = 4;
    // juvenile: 1/(1 − 0.2) · (1 + 0.3 · 4) = 2.75.
    const eta = lh?.lifeExpectancy as number[];
    [2.75, 4, 5].forEach((x, i) => expect(Math.abs((eta[i] as number) - x)).toBeLessThanOrEqual(1e-14));
    // Adult lifespan is geometric with survival 0.8: Var = 0.8/0.2² = 20 [derived].
    expect(Math.abs((lh?.lifeExpectancyVariance[2] as number) - 20)).toBeLessThanOrEqual(1e-12);
  });

  it("R0 = ρ(F N) = 5 · p_juv · η_adult = 3.75", () => {
    // [derived] A newborn juvenile reaches adulthood with probability 0.15 and then
    // lives 5 intervals on average, each with 5 offspring: R0 = 5 · 0.15 · 5.
    expect(Math.abs((lh?.netReproductiveRate as number) - 3.75)).toBeLessThanOrEqual(1e-13);
  });
});

describe("life history that does not exist", () => {
  it("I − U singular (an adult that never dies): null with a reason naming the stage", () => {
    const out = lifeHistory({ U: [[0, 0], [0.5, 1]], F: [[0, 2], [0, 0]], stageNames: ["young", "adult"] });
    expect(out.lifeHistory).toBeNull();
    expect(out.reason).toBe(
      "I − U is singular or U lets some individuals live forever (survival is 1 or more out of adult): life expectancy is infinite, so N = (I − U)⁻¹, R0 and the other life-history quantities do not exist.",
    );
  });

  it("analyzeMatrix without U and F: lifeHistory null with a reason", () => {
    const r = analyzeMatrix({ A: [[0.5, 2], [0.3, 0.6]] });
    expect(r.lifeHistory).toBeNull();
    expect(r.nullReasons.lifeHistory).toContain("U and F were not given");
    expect(analyzeMatrix({ A: [[0.5, 2], [0.3, 0.6]], U: [[0.5, 0], [0.3, 0.6]] }).nullReasons.lifeHistory).toBe("F was not given: the life-history quantities need both U and F.");
  });

  it("λ = 1 makes T_R0 = ln R0 / ln λ undefined: null with a reason", () => {
    // Newborns survive to adulthood with 0.5 and adults make 2 newborns: R0 = 1, λ = 1 [derived].
    const out = lifeHistory({ U: [[0, 0], [0.5, 0]], F: [[0, 2], [0, 0]] });
    expect(Math.abs((out.lifeHistory?.netReproductiveRate as number) - 1)).toBeLessThanOrEqual(1e-15);
    expect(out.lifeHistory?.generationTimeR0).toBeNull();
    expect(out.lifeHistory?.nullReasons.generationTimeR0).toContain("λ = 1");
    // This life cycle has period 2; the mean age of parents is still defined: λ v·w / vFw = 2 [derived].
    expect(Math.abs((out.lifeHistory?.meanAgeOfParents as number) - 2)).toBeLessThanOrEqual(1e-14);
  });
});

describe("projection", () => {
  it("projects the pre-breeding Leslie model from one newborn", () => {
    // By hand: n(1) = (0.5, 0.6, 0), n(2) = (0.5·0.5 + 1.5·0.6, 0.6·0.5, 0.6/3) = (1.15, 0.3, 0.2).
    const p = project(LESLIE_PRE.A, [1, 0, 0], 2);
    expect(p.population[1]).toEqual([0.5, 0.6, 0]);
    const n2 = p.population[2] as number[];
    [1.15, 0.3, 0.2].forEach((x, i) => expect(Math.abs((n2[i] as number) - x)).toBeLessThanOrEqual(1e-15));
    expect(p.total.map((t) => Number(t.toFixed(12)))).toEqual([1, 1.1, 1.65]);
    expect(p.growthRatio[0]).toBeNull();
    expect(Math.abs((p.growthRatio[2] as number) - 1.5)).toBeLessThanOrEqual(1e-14);
    expect(p.truncatedReason).toBeNull();
  });

  it("Keyfitz's Δ starts at 1 − w₁ from a newborn and shrinks towards 0", () => {
    const r = analyzeMatrix({ A: LESLIE_PRE.A, initial: [1, 0, 0], projectionSteps: 60 });
    const d = r.projection?.distanceToStable as number[];
    // Δ(0) = ½(|1 − w₁| + w₂ + w₃) = 1 − w₁ [derived].
    expect(Math.abs((d[0] as number) - (1 - (r.stableStage?.[0] as number)))).toBeLessThanOrEqual(1e-15);
    // The deviation shrinks like ρ^(−t) (here ρ ≈ 3.1, so ρ^(−60) is far below
    // rounding): it has gone to rounding level by t = 60 and has shrunk by t = 10.
    expect(r.dampingRatio as number).toBeGreaterThan(2);
    expect(d[60] as number).toBeLessThanOrEqual(1e-12);
    expect(d[10] as number).toBeLessThan((d[0] as number) / 100);
  });
});

describe("transient indices (Neubert & Caswell 1997; Stott, Townley & Hodgson 2011)", () => {
  // Leslie matrix fertile only in the last class: λ = 1, Â = A, w ∝ (4, 2, 1), v ∝ (1, 2, 4) [derived].
  const A = [
    [0, 0, 4],
    [0.5, 0, 0],
    [0, 0.5, 0],
  ];

  it("from a newborn: reactivity, amplification, attenuation and inertia", () => {
    // By hand: ‖Âᵗ n̂₀‖₁ = 0.5, 0.25, 1, 0.5, … ; inertia = (v·n̂₀)‖w‖₁/(v·w) = 1/(12/7) = 7/12.
    const t = transientIndices(A, [1, 0, 0]);
    expect(t).not.toBeNull();
    expect(Math.abs((t?.reactivity as number) - 0.5)).toBeLessThanOrEqual(1e-14);
    expect(t?.firstStepAttenuation).toBe(true);
    expect(Math.abs((t?.maxAmplification as number) - 1)).toBeLessThanOrEqual(1e-12);
    expect(t?.maxAmplificationTime).toBe(3);
    expect(Math.abs((t?.maxAttenuation as number) - 0.25)).toBeLessThanOrEqual(1e-12);
    expect(t?.maxAttenuationTime).toBe(2);
    expect(Math.abs((t?.inertia as number) - 7 / 12)).toBeLessThanOrEqual(1e-14);
    expect(t?.horizon).toBe(100);
  });

  it("bounds over every initial structure", () => {
    // Column sums of Â: 0.5, 0.5, 4; v_j‖w‖₁/(v·w) = 7/12, 14/12, 28/12 [derived].
    const b = transientIndices(A, [0, 0, 1])?.bounds;
    expect(Math.abs((b?.reactivityUpper as number) - 4)).toBeLessThanOrEqual(1e-14);
    expect(Math.abs((b?.firstStepAttenuationLower as number) - 0.5)).toBeLessThanOrEqual(1e-14);
    expect(Math.abs((b?.maxAmplificationUpper as number) - 4)).toBeLessThanOrEqual(1e-12);
    expect(Math.abs((b?.inertiaUpper as number) - 7 / 3)).toBeLessThanOrEqual(1e-14);
    expect(Math.abs((b?.inertiaLower as number) - 7 / 12)).toBeLessThanOrEqual(1e-14);
  });

  it("in analyzeMatrix, transient is null with a reason when λ = 0", () => {
    const r = analyzeMatrix({ A: [[0, 0], [0.5, 0]], initial: [1, 0] });
    expect(r.transient).toBeNull();
    expect(r.nullReasons.transient).toBe("λ = 0: there is no growth rate to standardise by.");
    expect(r.projection?.total.map((t) => Number(t.toFixed(12)))).toEqual(expect.arrayContaining([1, 0.5, 0]));
  });
});
