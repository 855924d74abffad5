// Published worked examples (METHODS.md §1). Every number carries its source
// and tolerance; values marked [memory] were recalled, not confirmed against
// the original paper, and are checked only to the digits printed.
import { describe, expect, it } from "vitest";
import { analyzeMatrix, dominantEigen } from "../../shared/demography";
import {
  KILLER_WHALE,
  LESLIE_POST,
  LESLIE_PRE,
  LOGGERHEAD,
  NET_MATERNITY,
  TEASEL,
  expectPrinted,
  mul,
  splitFirstRow,
} from "./demography-fixtures";

describe("teasel (Werner & Caswell 1977, in Caswell 2001)", () => {
  const r = analyzeMatrix({ A: TEASEL.A, stageNames: TEASEL.stages });

  it("λ = 2.3339", () => {
    // Caswell 2001 [pub; value from memory]: λ = 2.3339 (4 decimals).
    expectPrinted(r.lambda, 2.3339, 4);
    // METHODS.md "computed 2.333880" (6 decimals).
    expectPrinted(r.lambda, 2.33388, 6);
  });

  it("λ agrees with a 50-digit computation to 1e-14", () => {
    // Independent check: eigenvalues of the same matrix in 50-digit arithmetic
    // (mpmath 1.3.0, mp.eig, mp.dps = 50) gave 2.33388017144089857…; the nearest double is used below.
    expect(Math.abs(r.lambda - 2.3338801714408985) / 2.3338801714408985).toBeLessThanOrEqual(1e-14);
  });

  it("the largest elasticity is large rosette → flowering (a65 ≈ 0.293)", () => {
    // METHODS.md [derived]: largest elasticity a65 ≈ 0.293 (3 decimals).
    const E = r.elasticity as number[][];
    let best = { e: -1, i: -1, j: -1 };
    E.forEach((row, i) => row.forEach((e, j) => (e > best.e ? (best = { e, i, j }) : null)));
    expect([best.i, best.j]).toEqual([5, 4]);
    expectPrinted(best.e, 0.293, 3);
  });

  it("is a sound, primitive life cycle", () => {
    expect(r.structure.irreducible).toBe(true);
    expect(r.structure.primitive).toBe(true);
    expect(r.isSound).toBe(true);
    expect(r.converged).toBe(true);
  });
});

describe("killer whale (Brault & Caswell 1993, Ecology 74:1444)", () => {
  const { U, F } = splitFirstRow(KILLER_WHALE.A);
  const r = analyzeMatrix({ A: KILLER_WHALE.A, U, F, stageNames: KILLER_WHALE.stages });

  it("λ = 1.0254, inside the 90% bootstrap interval 1.0178–1.0322", () => {
    // Brault & Caswell 1993 abstract [pub]: λ = 1.0254 (4 decimals), 90% CI 1.0178–1.0322.
    expectPrinted(r.lambda, 1.0254, 4);
    expect(r.lambda).toBeGreaterThan(1.0178);
    expect(r.lambda).toBeLessThan(1.0322);
    // Independent check: 50-digit arithmetic (mpmath mp.eig) gave 1.0254413255303467392…; the nearest double is used below.
    expect(Math.abs(r.lambda - 1.0254413255303467) / 1.0254413255303467).toBeLessThanOrEqual(1e-14);
  });

  it("is reducible: post-reproductive females have reproductive value exactly 0", () => {
    // METHODS.md §1: stage 4 reaches no other stage, so v₄ = 0 [derived].
    expect(r.structure.irreducible).toBe(false);
    expect(r.reproductiveValue?.[3]).toBe(0);
    expect(r.reproductiveValueScaling?.index).toBe(0);
    expect(r.structure.blocks.map((b) => b.stages)).toEqual([[0, 1, 2], [3]]);
    expect(r.structure.blocks[0]?.dominant).toBe(true);
    // The post-reproductive group's own rate is a44 [derived: a 1×1 block].
    expect(r.structure.blocks[1]?.spectralRadius).toBe(0.9804);
  });

  it("the damping ratio is set by a44 = 0.9804", () => {
    // METHODS.md §1: "the damping ratio is set by a44" [derived]: λ₂ = a44 exactly
    // (the 3-stage block's own second eigenvalue is smaller in modulus).
    expect(r.secondEigenvalue?.im).toBe(0);
    expect(Math.abs((r.secondEigenvalue?.re ?? 0) - 0.9804)).toBeLessThanOrEqual(1e-12);
    expect(Math.abs((r.dampingRatio ?? 0) - r.lambda / 0.9804)).toBeLessThanOrEqual(1e-12);
  });

  it("explains the reducibility in the stage names, as information", () => {
    const d = r.diagnostics.find((x) => x.code === "reducible");
    expect(d?.severity).toBe("info");
    expect(d?.message).toContain("Post-reproductive female cannot lead back to it, so its reproductive value is 0");
    expect(d?.message).toContain("group (2) has its own growth rate 0.9804");
    const barren = r.diagnostics.find((x) => x.code === "no-future-reproduction");
    expect(barren?.stages).toEqual([3]);
    expect(r.isSound).toBe(true);
  });

  it("λ is most sensitive to adult and juvenile survival", () => {
    // Brault & Caswell 1993 [pub]: "most sensitive to adult and juvenile survival, then fertility".
    // As elasticities: the two largest are a33 (mature female survival) and a22 (juvenile survival).
    const E = r.elasticity as number[][];
    const ranked = E.flatMap((row, i) => row.map((e, j) => ({ e, at: `a${i + 1}${j + 1}` }))).sort((p, q) => q.e - p.e);
    expect(ranked.slice(0, 2).map((x) => x.at)).toEqual(["a33", "a22"]);
    // "Then fertility" is not an order between single entries here: stage 1 has
    // one way out, so the fertility elasticities sum exactly to that of yearling
    // survival, e12 + e13 = e21 [derived: elasticity in = elasticity out per stage].
    expect(Math.abs((E[0]?.[1] as number) + (E[0]?.[2] as number) - (E[1]?.[0] as number))).toBeLessThanOrEqual(1e-14);
  });
});

describe("loggerhead sea turtle (Crouse, Crowder & Caswell 1987, Ecology 68:1412)", () => {
  const r = analyzeMatrix({ A: LOGGERHEAD.A, stageNames: LOGGERHEAD.stages });

  it("λ = 0.9450, r = ln λ ≈ −0.0565", () => {
    // Crouse et al. 1987 [pub; from memory]: λ = 0.9450 (4 decimals), r ≈ −0.0565.
    expectPrinted(r.lambda, 0.945, 4);
    expectPrinted(Math.log(r.lambda), -0.0565, 4);
    // Independent check: 50-digit arithmetic (mpmath mp.eig) gave 0.94503098069100453777…; the nearest double is used below.
    expect(Math.abs(r.lambda - 0.9450309806910046) / 0.9450309806910046).toBeLessThanOrEqual(1e-14);
  });

  it("stable stage distribution ≈ 0.207, 0.670, 0.115, 0.0066, 0.0004, 0.0003, 0.0018", () => {
    // Crouse et al. 1987, Table 4 [memory]: checked to the digits printed.
    const w = r.stableStage as number[];
    [0.207, 0.67, 0.115].forEach((x, i) => expectPrinted(w[i] as number, x, 3));
    [0.0066, 0.0004, 0.0003, 0.0018].forEach((x, i) => expectPrinted(w[i + 3] as number, x, 4));
  });

  it("reproductive values ≈ 1, 1.40, 6.00, 115.8, 568.8, 507.4, 587.7", () => {
    // Crouse et al. 1987, Table 4 [memory]: checked to the digits printed; v₁ = 1 by scaling.
    const v = r.reproductiveValue as number[];
    expect(v[0]).toBe(1);
    expectPrinted(v[1] as number, 1.4, 2);
    expectPrinted(v[2] as number, 6.0, 2);
    [115.8, 568.8, 507.4, 587.7].forEach((x, i) => expectPrinted(v[i + 3] as number, x, 1));
  });

  it("elasticities along the juvenile chain are equal: e21 = e32 = e43 = e54", () => {
    // METHODS.md [derived]: stages 2, 3 and 4 each have one way in and one way
    // out besides stasis, and for such a stage the elasticity in equals the
    // elasticity out, so e21 = e32 = e43 = e54 exactly.
    const E = r.elasticity as number[][];
    const chain = [E[1]?.[0], E[2]?.[1], E[3]?.[2], E[4]?.[3]] as number[];
    for (const e of chain) expect(Math.abs(e - (chain[0] as number))).toBeLessThanOrEqual(1e-13);
    // Stage 5 has two ways out (to stage 6 and its fertility a15): e54 = e65 + e15 [derived].
    expect(Math.abs((E[4]?.[3] as number) - (E[5]?.[4] as number) - (E[0]?.[4] as number))).toBeLessThanOrEqual(1e-13);
  });

  it("stage entries follow from stage survival p and duration d", () => {
    // Crouse et al. 1987, Table 3 [memory]: small juveniles p = 0.7857, d = 7;
    // P = p(1 − p^(d−1))/(1 − p^d), G = p^d(1 − p)/(1 − p^d) give a22 and a32.
    const p = 0.7857;
    const d = 7;
    expectPrinted((p * (1 - p ** (d - 1))) / (1 - p ** d), 0.737, 3);
    expectPrinted((p ** d * (1 - p)) / (1 - p ** d), 0.0486, 4);
  });
});

describe("Leslie life table with exact answers (METHODS.md §1, [derived])", () => {
  // Euler–Lotka: Σ λ^(−x) l(x) m(x) = 1 with l(x)m(x) = 0.5, 0.9, 0.4.
  const eulerLotka = (lambda: number): number => NET_MATERNITY.reduce((s, lm, k) => s + lm * lambda ** -(k + 1), 0);
  const pre = analyzeMatrix({ A: LESLIE_PRE.A, U: LESLIE_PRE.U, F: LESLIE_PRE.F });
  const post = analyzeMatrix({ A: LESLIE_POST.A, U: LESLIE_POST.U, F: LESLIE_POST.F });

  it("both censuses give the λ that solves the Euler–Lotka equation", () => {
    expect(Math.abs(eulerLotka(pre.lambda) - 1)).toBeLessThanOrEqual(1e-14);
    expect(Math.abs(eulerLotka(post.lambda) - 1)).toBeLessThanOrEqual(1e-14);
    expect(Math.abs(pre.lambda - post.lambda)).toBeLessThanOrEqual(1e-14);
  });

  it("both give R0 = Σ l(x) m(x) = 1.8", () => {
    expect(Math.abs((pre.lifeHistory?.netReproductiveRate ?? 0) - 1.8)).toBeLessThanOrEqual(1e-14);
    expect(Math.abs((post.lifeHistory?.netReproductiveRate ?? 0) - 1.8)).toBeLessThanOrEqual(1e-14);
  });

  it("their stable stage distributions and reproductive values differ", () => {
    // Caswell 2001 §2: the census changes what the stages are, so w and v differ.
    expect(Math.abs((pre.stableStage?.[0] ?? 0) - (post.stableStage?.[0] ?? 0))).toBeGreaterThan(1e-3);
    expect(Math.abs((pre.reproductiveValue?.[1] ?? 0) - (post.reproductiveValue?.[1] ?? 0))).toBeGreaterThan(1e-3);
  });

  it("the pre-breeding w is the stable age distribution l(x)λ^(−x), normalised", () => {
    // Caswell 2001 §2 [derived]: in a pre-breeding Leslie model with survivorship from age 1, w_x ∝ λ^(−x) l(x)/l(1).
    const l = [0.5, 0.3, 0.1];
    const raw = l.map((lx, k) => (lx / 0.5) * pre.lambda ** -k);
    const total = raw.reduce((s, x) => s + x, 0);
    raw.forEach((x, k) => expect(Math.abs((pre.stableStage?.[k] ?? 0) - x / total)).toBeLessThanOrEqual(1e-14));
  });

  it("the mean age of parents is Σ x λ^(−x) l(x) m(x) in both censuses", () => {
    // Bienvenu & Legendre 2015 [derived for a Leslie matrix]: T̄ = λ v·w / vFw equals
    // the mean age of mothers in the stable population, Σ x λ^(−x) l(x) m(x) (ages 1, 2, 3).
    const expected = NET_MATERNITY.reduce((s, lm, k) => s + (k + 1) * lm * pre.lambda ** -(k + 1), 0);
    expect(Math.abs((pre.lifeHistory?.meanAgeOfParents ?? 0) - expected)).toBeLessThanOrEqual(1e-13);
    expect(Math.abs((post.lifeHistory?.meanAgeOfParents ?? 0) - expected)).toBeLessThanOrEqual(1e-13);
  });

  it("generation time T_R0 = ln R0 / ln λ", () => {
    expect(Math.abs((pre.lifeHistory?.generationTimeR0 ?? 0) - Math.log(1.8) / Math.log(pre.lambda))).toBeLessThanOrEqual(1e-13);
  });

  it("life expectancy and its variance from the lifespan distribution", () => {
    // Pre-breeding census from age 1: lifespan 1, 2, 3 intervals with probability
    // 0.4, 0.6·(2/3) = 0.4 and 0.6·(1/3) = 0.2, so η₁ = 1.8 and Var = 3.8 − 1.8² = 0.56 [derived].
    const lh = pre.lifeHistory;
    expect(Math.abs((lh?.lifeExpectancy[0] ?? 0) - 1.8)).toBeLessThanOrEqual(1e-14);
    expect(Math.abs((lh?.lifeExpectancyVariance[0] ?? 0) - 0.56)).toBeLessThanOrEqual(1e-13);
    expect(Math.abs((lh?.lifeExpectancy[1] ?? 0) - 4 / 3)).toBeLessThanOrEqual(1e-14);
    expect(lh?.lifeExpectancy[2]).toBe(1);
  });

  it("dominantEigen returns the same pair as analyzeMatrix", () => {
    const e = dominantEigen(LESLIE_PRE.A);
    expect(e.lambda).toBe(pre.lambda);
    const Aw = mul(LESLIE_PRE.A, e.w);
    Aw.forEach((x, i) => expect(Math.abs(x - e.lambda * (e.w[i] as number))).toBeLessThanOrEqual(1e-15));
  });
});
