// Levers: exact lever effects, break-even values, scenarios and LTRE, each
// checked against an independent computation (analyzeMatrix on the changed
// model, central finite differences, closed forms) or a published example.
import { describe, expect, it } from "vitest";
import { analyzeMatrix, breakEvenValues, ltreContributions } from "../../shared/demography";
import { buildMatrices, lifeCycleFromMatrix, LifeCycleSchema, rateScale, type LifeCycle } from "../../shared/lifecycle";
import { checkScenarioRules, type Scenario } from "../../shared/lifecycle/scenarios";
import { applyScenario, breakEvenTable, compareScenarios, LeverError, leverModel, lifeCycleLtre, rankLevers } from "../../shared/levers";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { KILLER_WHALE, LOGGERHEAD } from "./demography-fixtures";

const lambdaOfDoc = (doc: LifeCycle) => {
  const m = buildMatrices(doc);
  expect(m.errors).toEqual([]);
  return analyzeMatrix({ A: m.A }).lambda;
};
const withRate = (doc: LifeCycle, rateId: string, value: number): LifeCycle => ({ ...doc, rates: doc.rates.map((r) => (r.id === rateId ? { ...r, value } : r)) });

/**
 * Invented, constructed so that λ is not monotone in one rate: m is the
 * breeding effort of adults, raising fecundity (f·m) at a cost in adult
 * survival (s_a·(1 − m²)). With s_j = 0.3, s_a = 0.9, f = 3, λ = 1 where
 * 1 − s_a(1 − m²) − f·m·s_j = 0, i.e. 0.9 m² − 0.9 m + 0.1 = 0, so
 * m = 1/2 ± √0.45/1.8 [derived: characteristic polynomial of the 2×2 matrix at λ = 1].
 */
function effortLifeCycle(m = 0.5): LifeCycle {
  return {
    ...threeStageLifeCycle(),
    name: "Breeding effort",
    stages: [
      { id: "st_j", name: "Juvenile", position: { x: 0, y: 0 } },
      { id: "st_a", name: "Adult", position: { x: 200, y: 0 } },
    ],
    rates: [
      { id: "vr_sj", name: "s_j", value: 0.3 },
      { id: "vr_sa", name: "s_a", value: 0.9 },
      { id: "vr_f", name: "f", value: 3 },
      { id: "vr_m", name: "m", value: m },
    ],
    transitions: [
      { id: "tr_ja", from: "st_j", to: "st_a", kind: "growth", rate: "s_j" },
      { id: "tr_aa", from: "st_a", to: "st_a", kind: "stasis", rate: "s_a * (1 - m^2)" },
      { id: "tr_aj", from: "st_a", to: "st_j", kind: "reproduction", rate: "f * m" },
    ],
  };
}

function loggerheadDoc(): LifeCycle {
  return lifeCycleFromMatrix(LOGGERHEAD.A, LOGGERHEAD.stages, { reproductionRows: [0] });
}

describe("lever ranking", () => {
  const doc = threeStageLifeCycle();
  const model = leverModel(doc);
  const ranking = rankLevers(model, { relativeChange: 0.1 });

  it("each rate's exact Δλ equals λ recomputed on the changed life cycle", () => {
    const base = lambdaOfDoc(doc);
    for (const row of ranking.rows.filter((r) => r.kind === "rate")) {
      const r = doc.rates.find((x) => x.id === row.rateId)!;
      for (const [stepName, factor] of [["increase", 1.1], ["decrease", 0.9]] as const) {
        const step = row[stepName];
        const wanted = Math.min(r.value * factor, rateScale(r) === "probability" ? 1 : Infinity);
        expect(step.to).toBeCloseTo(wanted, 14);
        const recomputed = lambdaOfDoc(withRate(doc, r.id, wanted)) - base;
        expect(Math.abs(step.deltaLambda! - recomputed)).toBeLessThan(1e-12);
      }
    }
  });

  it("each non-zero entry's exact Δλ equals λ of the matrix with that entry changed", () => {
    const A = buildMatrices(doc).A;
    const base = analyzeMatrix({ A }).lambda;
    const entries = ranking.rows.filter((r) => r.kind === "entry");
    expect(entries).toHaveLength(5);
    for (const row of entries) {
      const i = doc.stages.findIndex((s) => s.id === row.to);
      const j = doc.stages.findIndex((s) => s.id === row.from);
      const changed = A.map((r) => [...r]);
      changed[i]![j] = row.increase.to;
      expect(Math.abs(row.increase.deltaLambda! - (analyzeMatrix({ A: changed }).lambda - base))).toBeLessThan(1e-12);
    }
  });

  it("is exact on a reducible matrix too (killer whale, post-reproductive females lead nowhere)", () => {
    // Brault & Caswell 1993 matrix (METHODS.md §1): reducible, v₄ = 0.
    const whale = lifeCycleFromMatrix(KILLER_WHALE.A, KILLER_WHALE.stages, { reproductionRows: [0] });
    const r = rankLevers(leverModel(whale), { relativeChange: 0.1 });
    const base = analyzeMatrix({ A: KILLER_WHALE.A }).lambda;
    expect(r.rows).toHaveLength(8);
    for (const row of r.rows) {
      const i = whale.stages.findIndex((s) => s.id === row.to);
      const j = whale.stages.findIndex((s) => s.id === row.from);
      for (const step of [row.increase, row.decrease]) {
        const changed = KILLER_WHALE.A.map((x) => [...x]);
        changed[i]![j] = step.to;
        expect(Math.abs(step.deltaLambda! - (analyzeMatrix({ A: changed }).lambda - base))).toBeLessThan(1e-12);
      }
    }
    // The post-reproductive stage's survival does not move λ (its reproductive value is 0).
    const post = r.rows.find((x) => x.from === x.to && x.label.startsWith(KILLER_WHALE.stages[3]!))!;
    expect(Math.abs(post.increase.deltaLambda!)).toBeLessThan(1e-14); // 0 up to rounding in λ (≈ 1)
  });

  it("a 10 % rise of a probability near 1 stops at the bound and says so", () => {
    const high = leverModel(withRate(doc, "vr_sa", 0.95));
    const row = rankLevers(high).rows.find((r) => r.rateId === "vr_sa")!;
    expect(row.increase.to).toBe(1);
    expect(row.increase.limitedBy).toBe("upper");
    // Adult stasis a33 = s_a: its survival column (0.95) can rise only to 1 as well.
    const cell = rankLevers(high).rows.find((r) => r.kind === "entry" && r.from === "st_a" && r.to === "st_a")!;
    expect(cell.increase.to).toBeCloseTo(1, 14);
    expect(cell.increase.limitedBy).toBe("upper");
  });

  it("the elasticity ranking agrees with central finite differences of λ", () => {
    const base = lambdaOfDoc(doc);
    const fd = doc.rates.map((r) => {
      const h = 1e-6 * r.value;
      const dl = (lambdaOfDoc(withRate(doc, r.id, r.value + h)) - lambdaOfDoc(withRate(doc, r.id, r.value - h))) / (2 * h);
      return { id: r.id, elasticity: (r.value / base) * dl };
    });
    const rows = ranking.rows.filter((r) => r.kind === "rate");
    for (const f of fd) expect(rows.find((r) => r.rateId === f.id)!.elasticity).toBeCloseTo(f.elasticity, 7);
    // s_j and f lie on every cycle through the juveniles, so their elasticities are equal: ties are ordered by id.
    const key = (e: number) => Math.round(Math.abs(e) * 1e9);
    const order = (xs: { id: string; e: number }[]) => [...xs].sort((p, q) => key(q.e) - key(p.e) || p.id.localeCompare(q.id)).map((x) => x.id);
    expect(order(rows.map((r) => ({ id: r.rateId!, e: r.elasticity })))).toEqual(order(fd.map((f) => ({ id: f.id, e: f.elasticity }))));
  });

  it("the first-order estimate is close to, but not the same as, the exact change", () => {
    const sa = ranking.rows.find((r) => r.rateId === "vr_sa")!;
    expect(sa.increase.firstOrder).not.toBe(sa.increase.deltaLambda);
    expect(Math.abs(sa.increase.firstOrder - sa.increase.deltaLambda!)).toBeLessThan(0.1 * Math.abs(sa.increase.deltaLambda!));
  });

  it("ranks by an achievable change stated in a scenario", () => {
    const scenarios: Scenario[] = [
      { id: "sc_1", name: "Head-start juveniles", changes: [{ id: "ch_1", target: { kind: "rate", rateId: "vr_sj" }, op: "multiply", value: 1.2, achievable: 1.5 }] },
    ];
    const r = rankLevers(model, { scenarios });
    const sj = r.rows.find((x) => x.rateId === "vr_sj")!;
    expect(sj.achievable?.to).toBeCloseTo(0.45, 14);
    expect(Math.abs(sj.achievable!.deltaLambda! - (lambdaOfDoc(withRate(doc, "vr_sj", 0.45)) - model.lambda))).toBeLessThan(1e-12);
    expect(r.rows.find((x) => x.rateId === "vr_f")!.achievable).toBeNull();
  });

  it("refuses a non-positive relative change", () => {
    expect(() => rankLevers(model, { relativeChange: 0 })).toThrow(/above 0/);
  });
});

describe("break-even values", () => {
  it("each value, fed back into the life cycle, gives λ = 1 within 1e-9", () => {
    for (const doc of [threeStageLifeCycle(), effortLifeCycle(0.5)]) {
      const table = breakEvenTable(leverModel(doc));
      let checked = 0;
      for (const row of table.rows.filter((r) => r.kind === "rate")) {
        const rate = doc.rates.find((r) => r.id === row.key)!;
        for (const c of row.crossings) {
          expect(Math.abs(lambdaOfDoc(withRate(doc, rate.id, c.value)) - 1)).toBeLessThan(1e-9);
          checked += 1;
        }
      }
      expect(checked).toBeGreaterThan(2);
    }
  });

  it("reports both crossings when λ rises and falls with one rate", () => {
    const row = breakEvenTable(leverModel(effortLifeCycle(0.5)), { keys: ["vr_m"] }).rows[0]!;
    const exact = [0.5 - Math.sqrt(0.45) / 1.8, 0.5 + Math.sqrt(0.45) / 1.8]; // [derived] see effortLifeCycle
    expect(row.crossings.map((c) => c.value)).toHaveLength(2);
    row.crossings.forEach((c, k) => expect(Math.abs(c.value - exact[k]!)).toBeLessThan(1e-10));
    expect(row.crossings.map((c) => c.direction)).toEqual(["up", "down"]);
    expect(row.note).toMatch(/crosses 1 2 times/);
  });

  it("finds two crossings that lie between two scan points", () => {
    // λ(x) = 1 + (x − 0.5)² − 1e-6 on [0, 1] dips below 1 only within ±0.001 of 0.5: no scan point sees it.
    const f = (x: number) => 1 + (x - 0.5) ** 2 - 1e-6;
    const r = breakEvenValues(f, { value: 0.2, lower: 0, upper: 1, gridPoints: 20 });
    expect(r.crossings.map((c) => c.value)).toHaveLength(2);
    expect(Math.abs(r.crossings[0]!.value - 0.499)).toBeLessThan(1e-9);
    expect(Math.abs(r.crossings[1]!.value - 0.501)).toBeLessThan(1e-9);
  });

  it('says "not reachable" with the λ range when no value within bounds reaches the target', () => {
    const doc = threeStageLifeCycle();
    const row = breakEvenTable(leverModel(doc), { keys: ["vr_sj"], target: 1.5 }).rows[0]!;
    expect(row.crossings).toEqual([]);
    expect(row.note).toMatch(/^Not reachable: λ stays between \d\.\d{4} and \d\.\d{4} over \[0, 1\]/);
    expect(row.lambdaMax!.value).toBe(1);
    expect(Math.abs(row.lambdaMax!.lambda - lambdaOfDoc(withRate(doc, "vr_sj", 1)))).toBeLessThan(1e-12);
  });

  it("searches a fecundity over [0, 1000 × its value] and finds the one crossing", () => {
    const doc = threeStageLifeCycle();
    const row = breakEvenTable(leverModel(doc), { keys: ["vr_f"] }).rows[0]!;
    expect(row.lower).toBe(0);
    expect(row.upper).toBeCloseTo(1.6 + 1000 * 1.6, 9);
    expect(row.upperIsBound).toBe(false);
    expect(row.crossings).toHaveLength(1);
    expect(Math.abs(lambdaOfDoc(withRate(doc, "vr_f", row.crossings[0]!.value)) - 1)).toBeLessThan(1e-9);
  });
});

describe("scenarios", () => {
  const doc = threeStageLifeCycle();

  it("applies rate and entry changes; λ of the result is λ of the hand-changed matrix", () => {
    const scenario: Scenario = {
      id: "sc_1",
      name: "Two actions",
      changes: [
        { id: "ch_1", target: { kind: "rate", rateId: "vr_sj" }, op: "add", value: 0.05 },
        { id: "ch_2", target: { kind: "entry", from: "st_a", to: "st_j" }, op: "multiply", value: 1.25 },
        { id: "ch_3", target: { kind: "entry", from: "st_s", to: "st_s" }, op: "set", value: 0.3 },
      ],
    };
    const changed = applyScenario(doc, scenario);
    const A = [
      [0, 0, 1.6 * 1.25],
      [0.35, 0.3, 0],
      [0, 0.6 * 0.4, 0.85],
    ];
    expect(Math.abs(lambdaOfDoc(changed) - analyzeMatrix({ A }).lambda)).toBeLessThan(1e-13);
    // A multiplied arrow keeps its formula, so it still follows the rates.
    expect(changed.transitions.find((t) => t.id === "tr_aj")!.rate).toBe("(f) * 1.25");
  });

  it("refuses a change that takes a probability above 1, naming the rate and the bound", () => {
    const scenario: Scenario = { id: "sc_1", name: "Too much", changes: [{ id: "ch_1", target: { kind: "rate", rateId: "vr_sa" }, op: "multiply", value: 1.2 }] };
    expect(() => applyScenario(doc, scenario)).toThrow('Scenario "Too much" takes s_a to 1.02, above its upper bound 1 (it is a probability).');
    const issues: { path: (string | number)[]; message: string }[] = [];
    checkScenarioRules({ ...doc, scenarios: [scenario] }, (path, message) => issues.push({ path, message }));
    expect(issues).toEqual([{ path: ["scenarios", 0, "changes", 0, "value"], message: 'Scenario "Too much" takes s_a to 1.02, above its upper bound 1 (it is a probability).' }]);
  });

  it("the document refuses such a change too, at the field's path, and keeps a valid one", () => {
    const over = LifeCycleSchema.safeParse({ ...doc, scenarios: [{ id: "sc_1", name: "Too much", changes: [{ id: "ch_1", target: { kind: "rate", rateId: "vr_sa" }, op: "add", value: 0.1, achievable: 0.2 }] }] });
    expect(over.success).toBe(false);
    expect(over.error!.issues.map((i) => [i.path.join("."), i.message])).toEqual([
      ["scenarios.0.changes.0.achievable", 'Scenario "Too much" at its achievable change would take s_a to 1.05, above its upper bound 1 (it is a probability).'],
    ]);
    const ok = LifeCycleSchema.parse({ ...doc, scenarios: [{ id: "sc_1", name: "Fine", cost: 3, changes: [{ id: "ch_1", target: { kind: "rate", rateId: "vr_sa" }, op: "add", value: 0.05, achievable: 0.1 }] }] });
    expect(ok.scenarios![0]!.changes[0]!.achievable).toBe(0.1);
    // Changes build on each other: 0.85 × 1.1 + 0.15 = 1.085.
    const twice = LifeCycleSchema.safeParse({
      ...doc,
      scenarios: [{ id: "sc_1", name: "Twice", changes: [{ id: "ch_1", target: { kind: "rate", rateId: "vr_sa" }, op: "multiply", value: 1.1 }, { id: "ch_2", target: { kind: "rate", rateId: "vr_sa" }, op: "add", value: 0.15 }] }],
    });
    expect(twice.error!.issues.map((i) => [i.path.join("."), i.message])).toEqual([["scenarios.0.changes.1.value", 'Scenario "Twice" takes s_a to 1.085, above its upper bound 1 (it is a probability).']]);
    const negative = LifeCycleSchema.safeParse({ ...doc, scenarios: [{ id: "sc_1", name: "Neg", changes: [{ id: "ch_1", target: { kind: "entry", from: "st_a", to: "st_j" }, op: "multiply", value: -1 }] }] });
    expect(negative.error!.issues.map((i) => i.message)).toEqual(['Scenario "Neg": a factor cannot be negative; got -1.']);
  });

  it("refuses a change below 0 and a reference to a rate that does not exist", () => {
    const below: Scenario = { id: "sc_1", name: "Cull", changes: [{ id: "ch_1", target: { kind: "rate", rateId: "vr_f" }, op: "add", value: -2 }] };
    expect(() => applyScenario(doc, below)).toThrow("takes f to -0.4, below its lower bound 0 (it cannot be negative)");
    const ghost: Scenario = { id: "sc_2", name: "Ghost", changes: [{ id: "ch_2", target: { kind: "rate", rateId: "vr_nope" }, op: "set", value: 0.5 }] };
    const issues: string[] = [];
    checkScenarioRules({ ...doc, scenarios: [ghost] }, (path, message) => issues.push(`${path.join(".")}: ${message}`));
    expect(issues).toEqual(['scenarios.0.changes.0.target.rateId: Scenario "Ghost" changes a vital rate that does not exist (id "vr_nope").']);
    expect(() => applyScenario(doc, ghost)).toThrow(LeverError);
  });

  it("refuses an entry change where there is no arrow, or that takes survival above 1", () => {
    const none: Scenario = { id: "sc_1", name: "New arrow", changes: [{ id: "ch_1", target: { kind: "entry", from: "st_j", to: "st_a" }, op: "set", value: 0.1 }] };
    expect(() => applyScenario(doc, none)).toThrow("no arrow goes from Juvenile to Adult");
    const over: Scenario = { id: "sc_2", name: "Over", changes: [{ id: "ch_1", target: { kind: "entry", from: "st_a", to: "st_a" }, op: "add", value: 0.2 }] };
    expect(() => applyScenario(doc, over)).toThrow("takes the survival part of the entry Adult → Adult to 1.05, above its upper bound 1");
  });

  it("compares baseline and scenarios: λ, R0, generation time, Δλ per cost, problems", () => {
    const scenarios: Scenario[] = [
      { id: "sc_1", name: "Adults", cost: 2, changes: [{ id: "ch_1", target: { kind: "rate", rateId: "vr_sa" }, op: "set", value: 0.9, achievable: 0.95 }] },
      { id: "sc_2", name: "Impossible", changes: [{ id: "ch_2", target: { kind: "rate", rateId: "vr_sa" }, op: "multiply", value: 2 }] },
    ];
    const c = compareScenarios(doc, scenarios);
    expect(c.rows.map((r) => r.name)).toEqual(["Baseline", "Adults", "Impossible"]);
    const adults = c.rows[1]!;
    const changed = withRate(doc, "vr_sa", 0.9);
    expect(Math.abs(adults.planned!.lambda - lambdaOfDoc(changed))).toBeLessThan(1e-13);
    const m = buildMatrices(changed);
    const a = analyzeMatrix({ A: m.A, U: m.U, F: m.F });
    expect(adults.planned!.netReproductiveRate).toBeCloseTo(a.lifeHistory!.netReproductiveRate, 12);
    expect(adults.planned!.generationTime).toBeCloseTo(a.lifeHistory!.meanAgeOfParents!, 12);
    expect(adults.deltaLambdaPerCost).toBeCloseTo(adults.planned!.deltaLambda / 2, 14);
    expect(Math.abs(adults.achievable!.lambda - lambdaOfDoc(withRate(doc, "vr_sa", 0.95)))).toBeLessThan(1e-13);
    expect(c.rows[2]!.planned).toBeNull();
    expect(c.rows[2]!.problem?.message).toMatch(/takes s_a to 1\.7, above its upper bound 1/);
  });
});

describe("LTRE (fixed design)", () => {
  it("loggerhead with small-juvenile survival raised 10 %: contributions sum to Δλ within 1 %", () => {
    // Crouse, Crowder & Caswell 1987 matrix (METHODS.md §1). Small juveniles'
    // survival p = 0.7857 [memory] raised 10 %; P and G of column 2 recomputed
    // from p and d = 7 with P = p(1−p^(d−1))/(1−p^d), G = p^d(1−p)/(1−p^d).
    const p = 0.7857 * 1.1;
    const d = 7;
    const P = (p * (1 - p ** (d - 1))) / (1 - p ** d);
    const G = (p ** d * (1 - p)) / (1 - p ** d);
    const raised = LOGGERHEAD.A.map((row) => [...row]);
    raised[1]![1] = P;
    raised[2]![1] = G;
    const r = ltreContributions(LOGGERHEAD.A, raised);
    expect(r.deltaLambda).toBeGreaterThan(0);
    expect(Math.abs(r.total - r.deltaLambda) / r.deltaLambda).toBeLessThan(0.01);
    // Only the two changed entries contribute.
    r.contributions.forEach((row, i) => row.forEach((c, j) => expect(c !== 0).toBe((i === 1 || i === 2) && j === 1)));
    expect(r.lambdaReference).toBeCloseTo(0.945, 3); // [pub; from memory] λ = 0.9450
  });

  it("between two life cycles: stages matched by name, rates decomposed when formulas match", () => {
    const reference = threeStageLifeCycle();
    const comparison = { ...withRate(reference, "vr_sj", 0.33), name: "Treated", stages: [...reference.stages].reverse() };
    const r = lifeCycleLtre(reference, comparison);
    expect(r.stageNames).toEqual(["Juvenile", "Subadult", "Adult"]);
    expect(Math.abs(r.deltaLambda - (lambdaOfDoc(comparison) - lambdaOfDoc(reference)))).toBeLessThan(1e-13);
    expect(r.rates).not.toBeNull();
    const sj = r.rates!.find((x) => x.name === "s_j")!;
    expect(Math.abs(sj.contribution - r.total)).toBeLessThan(1e-15);
    expect(Math.abs(r.ratesTotal! - r.deltaLambda) / r.deltaLambda).toBeLessThan(0.01);
    r.rates!.filter((x) => x.name !== "s_j").forEach((x) => expect(x.contribution).toBe(0));
  });

  it("refuses life cycles with different stages, listing the mismatch", () => {
    const reference = threeStageLifeCycle();
    const other = { ...reference, name: "Other", stages: reference.stages.map((s) => (s.id === "st_s" ? { ...s, name: "Yearling" } : s)) };
    expect(() => lifeCycleLtre(reference, other)).toThrow(
      'An LTRE compares life cycles with the same stages, and these differ — only in "Three-stage test": Subadult; only in "Other": Yearling.',
    );
  });

  it("compares only entries when the formulas differ", () => {
    const reference = loggerheadDoc();
    const comparison = { ...reference, transitions: reference.transitions.map((t) => (typeof t.rate === "number" ? { ...t, rate: t.rate * 1.01 } : t)) };
    const r = lifeCycleLtre(reference, comparison);
    expect(r.rates).toBeNull();
    expect(r.rateNote).toMatch(/no named vital rates/);
  });
});
