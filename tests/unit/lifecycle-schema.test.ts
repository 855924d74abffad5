import { describe, expect, it } from "vitest";
import type { z } from "zod";
import {
  emptyLifeCycle,
  ID_PATTERN,
  LIFE_CYCLE_SCHEMA_VERSION,
  LifeCycleSchema,
  MAX_FORMULA_LENGTH,
  MAX_RATES,
  MAX_STAGES,
  newId,
  rateScale,
  type LifeCycleInput,
} from "../../shared/lifecycle";

/** A complete, valid document using every field; override parts per test. */
function validDocument(overrides: Partial<LifeCycleInput> = {}): LifeCycleInput {
  return {
    stagewright: LIFE_CYCLE_SCHEMA_VERSION,
    name: "Hillside population",
    census: "pre-breeding",
    timeStepUnit: "year",
    notes: "Invented example.",
    stages: [
      { id: "st_seed", name: "Seed", position: { x: 0, y: 0 } },
      { id: "st_juv", name: "Juvenile", color: "#2f6b5a", position: { x: 200, y: 0 }, notes: "first year above ground" },
      { id: "st_adu", name: "Adult", position: { x: 400, y: -20.5 } },
    ],
    rates: [
      { id: "vr_sj", name: "s_j", value: 0.4, se: 0.05, unit: "per year", source: "Field data 2019–2023" },
      { id: "vr_sa", name: "s_a", value: 0.8, ci: { lower: 0.72, upper: 0.86, level: 0.95 }, notes: "adult survival" },
      { id: "vr_g", name: "g", value: 0.3 },
      { id: "vr_m", name: "m", value: 12.5, unit: "seeds per adult" },
      { id: "vr_b0", name: "b0", value: -1.2 },
    ],
    transitions: [
      { id: "tr_germ", from: "st_seed", to: "st_juv", kind: "growth", rate: 0.05 },
      { id: "tr_jj", from: "st_juv", to: "st_juv", kind: "stasis", rate: "s_j * (1 - g)" },
      { id: "tr_ja", from: "st_juv", to: "st_adu", kind: "growth", rate: "s_j * g" },
      { id: "tr_aa", from: "st_adu", to: "st_adu", kind: "stasis", rate: "s_a" },
      { id: "tr_aj", from: "st_adu", to: "st_juv", kind: "shrinkage", rate: "0.1 * s_a" },
      { id: "tr_as", from: "st_adu", to: "st_seed", kind: "reproduction", rate: "m * invlogit(b0)" },
      { id: "tr_aa_r", from: "st_adu", to: "st_adu", kind: "reproduction", rate: 0.01 },
    ],
    ...overrides,
  };
}

function issuesOf(doc: unknown): z.core.$ZodIssue[] {
  const r = LifeCycleSchema.safeParse(doc);
  if (r.success) throw new Error("expected the document to be rejected");
  return r.error.issues;
}

/** The issues at exactly this path, e.g. "transitions.3.to". */
function issuesAt(doc: unknown, path: string): z.core.$ZodIssue[] {
  return issuesOf(doc).filter((i) => i.path.join(".") === path);
}

function withTransition(index: number, change: Record<string, unknown>): LifeCycleInput {
  const doc = validDocument();
  doc.transitions = doc.transitions.map((t, i) => (i === index ? { ...t, ...change } : t)) as LifeCycleInput["transitions"];
  return doc;
}

describe("LifeCycleSchema", () => {
  it("accepts a complete document and returns it unchanged", () => {
    const doc = validDocument();
    expect(LifeCycleSchema.parse(doc)).toEqual(doc);
  });

  it("trims names and accepts an empty life cycle", () => {
    const parsed = LifeCycleSchema.parse(validDocument({ name: "  Hillside  ", stages: [], rates: [], transitions: [] }));
    expect(parsed.name).toBe("Hillside");
  });

  it("names a missing stage in an arrow by its path (transitions.3.to)", () => {
    const issues = issuesAt(withTransition(3, { to: "st_nowhere" }), "transitions.3.to");
    expect(issues).toHaveLength(1);
    expect(issues[0]!.message).toBe('No stage has the id "st_nowhere".');
  });

  it("names a missing source stage (transitions.n.from)", () => {
    expect(issuesAt(withTransition(0, { from: "st_x" }), "transitions.0.from")).toHaveLength(1);
  });

  it("requires unique ids within and across stages, rates and arrows", () => {
    const doc = validDocument();
    doc.stages[2] = { ...doc.stages[2]!, id: "st_seed" };
    expect(issuesAt(doc, "stages.2.id")[0]!.message).toBe('Duplicate id "st_seed": stages.0 already uses it.');

    const cross = validDocument();
    cross.rates[1] = { ...cross.rates[1]!, id: "st_juv" };
    expect(issuesAt(cross, "rates.1.id")[0]!.message).toContain("stages.1 already uses it");

    expect(issuesAt(withTransition(4, { id: "tr_germ" }), "transitions.4.id")).toHaveLength(1);
  });

  it("requires well-formed ids", () => {
    const doc = validDocument();
    doc.stages[0] = { ...doc.stages[0]!, id: "st seed" };
    expect(issuesAt(doc, "stages.0.id")).toHaveLength(1);
  });

  it("requires stasis to be a self-loop", () => {
    const issues = issuesAt(withTransition(1, { to: "st_adu" }), "transitions.1.kind");
    expect(issues[0]!.message).toContain("A stasis arrow stays in its stage");
  });

  it.each(["growth", "shrinkage"])("refuses a %s self-loop", (kind) => {
    const issues = issuesAt(withTransition(0, { kind, to: "st_seed" }), "transitions.0.kind");
    expect(issues[0]!.message).toContain("a self-loop is stasis or reproduction");
  });

  it("allows a reproduction self-loop", () => {
    expect(LifeCycleSchema.safeParse(validDocument()).success).toBe(true); // tr_aa_r is one
  });

  it("allows at most one arrow per (from, to, kind)", () => {
    const doc = validDocument();
    doc.transitions.push({ id: "tr_dup", from: "st_juv", to: "st_adu", kind: "growth", rate: 0.1 });
    const issues = issuesAt(doc, "transitions.7");
    expect(issues[0]!.message).toBe('transitions.2 is already a growth arrow from "Juvenile" to "Adult"; combine them into one.');
  });

  it("refuses growth and shrinkage between the same two stages", () => {
    const doc = validDocument();
    doc.transitions.push({ id: "tr_x", from: "st_adu", to: "st_juv", kind: "growth", rate: 0.1 });
    expect(issuesAt(doc, "transitions.7.kind")[0]!.message).toContain("either growth or shrinkage, not both");
  });

  it.each([
    [-0.1, "A rate cannot be negative; got -0.1."],
    [Number.POSITIVE_INFINITY, undefined],
    [Number.NaN, undefined],
    [null, "A rate is a finite number or a formula (text)."],
  ])("refuses the numeric rate %s", (value, message) => {
    const issues = issuesAt(withTransition(0, { rate: value }), "transitions.0.rate");
    expect(issues).toHaveLength(1);
    if (message !== undefined) expect(issues[0]!.message).toBe(message);
  });

  it("checks formulas against the document's vital rates, keeping the structured error", () => {
    const issues = issuesAt(withTransition(2, { rate: "s_j * gg" }), "transitions.2.rate");
    expect(issues).toHaveLength(1);
    expect(issues[0]!.message).toContain('Unknown vital rate "gg" at character 7');
    const params = (issues[0] as { params?: { formulaError?: unknown } }).params;
    expect(params?.formulaError).toMatchObject({ code: "unknown-rate", name: "gg", position: 6 });
  });

  it.each([
    ["s_j * (1 - g", "syntax"],
    ["x = 1", "not-allowed"],
    ["", "empty"],
    ["a".repeat(MAX_FORMULA_LENGTH + 1), "too-long"],
  ])("refuses the formula %j", (formula, code) => {
    const issues = issuesAt(withTransition(2, { rate: formula }), "transitions.2.rate");
    expect((issues[0] as { params?: { formulaError?: { code: string } } }).params?.formulaError?.code).toBe(code);
  });

  it.each([
    ["2x", "is not a valid vital-rate name"],
    ["s j", "is not a valid vital-rate name"],
    ["exp", "is the name of a formula function"],
    ["pi", "is a constant in formulas"],
    ["mod", "is a reserved word"],
  ])("refuses the vital-rate name %j", (name, text) => {
    const doc = validDocument();
    doc.rates[2] = { ...doc.rates[2]!, name };
    expect(issuesAt(doc, "rates.2.name")[0]!.message).toContain(text);
  });

  it("requires unique vital-rate names and unique stage names", () => {
    const doc = validDocument();
    doc.rates[3] = { ...doc.rates[3]!, name: "g" };
    expect(issuesAt(doc, "rates.3.name")[0]!.message).toContain('Two vital rates are named "g"');
    const stages = validDocument();
    stages.stages[1] = { ...stages.stages[1]!, name: " Adult " };
    expect(issuesAt(stages, "stages.2.name")[0]!.message).toContain('Two stages are named "Adult"');
  });

  it("checks vital-rate uncertainty", () => {
    const doc = validDocument();
    doc.rates[0] = { ...doc.rates[0]!, se: -1 };
    doc.rates[1] = { ...doc.rates[1]!, ci: { lower: 0.9, upper: 0.8, level: 95 } };
    const issues = issuesOf(doc).map((i) => i.path.join("."));
    expect(issues).toEqual(expect.arrayContaining(["rates.0.se", "rates.1.ci.level"]));
    const ordered = validDocument();
    ordered.rates[1] = { ...ordered.rates[1]!, ci: { lower: 0.9, upper: 0.8, level: 0.95 } };
    expect(issuesAt(ordered, "rates.1.ci.upper")[0]!.message).toBe("The upper bound is below the lower bound.");
  });

  it("accepts the version-2 fields: scale, counts, distribution, thermal response, correlations, scenarios, climate", () => {
    const doc = validDocument({
      correlations: [{ a: "vr_sj", b: "vr_sa", r: 0.4 }],
      scenarios: [
        {
          id: "sc_fence",
          name: "Fence the breeding pond",
          action: "Invented: fence against trampling",
          cost: 12,
          changes: [
            { id: "ch_1", target: { kind: "rate", rateId: "vr_sa" }, op: "multiply", value: 1.1 },
            { id: "ch_2", target: { kind: "entry", from: "st_seed", to: "st_juv" }, op: "set", value: 0.08 },
          ],
        },
      ],
      climate: { range: { min: 0, max: 35 }, trajectory: { kind: "trend", startYear: 2025, years: 50, baseline: 14, trendPerDecade: 0.3, sd: 0.6 } },
    });
    doc.rates[0] = { ...doc.rates[0]!, scale: "probability", counts: { k: 40, n: 100 }, distribution: { family: "beta", alpha: 40, beta: 60 } };
    doc.rates[3] = { ...doc.rates[3]!, scale: "non-negative", thermal: { form: "arrhenius", appliesTo: "rate", activationEnergy: 0.65, referenceTemperature: 15, valueAtReference: 12.5 } };
    expect(LifeCycleSchema.parse(doc)).toEqual(doc);
  });

  it("checks the version-2 fields across the document, naming the rate or scenario", () => {
    const doc = validDocument({
      correlations: [
        { a: "vr_sj", b: "vr_nope", r: 0.2 },
        { a: "vr_sa", b: "vr_sa", r: 0.1 },
      ],
      scenarios: [{ id: "sc_1", name: "Weed", changes: [{ id: "ch_1", target: { kind: "rate", rateId: "vr_gone" }, op: "add", value: 0.1 }] }],
      climate: { range: { min: 30, max: 10 } },
    });
    doc.rates[0] = { ...doc.rates[0]!, counts: { k: 12, n: 10 } };
    doc.rates[1] = { ...doc.rates[1]!, thermal: { form: "gaussian-quadratic", appliesTo: "rate", optimum: 20, width: 3, criticalMaximum: 18, valueAtOptimum: 0.9 } };
    expect(issuesAt(doc, "rates.0.counts.k")[0]!.message).toBe("k (individuals that did it) cannot exceed n (individuals at risk).");
    expect(issuesAt(doc, "correlations.0.b")[0]!.message).toBe('No vital rate has the id "vr_nope".');
    expect(issuesAt(doc, "correlations.1.b")[0]!.message).toContain('both ends are "s_a"');
    expect(issuesAt(doc, "scenarios.0.changes.0.target.rateId")[0]!.message).toContain('Scenario "Weed" changes a vital rate that does not exist');
    expect(issuesAt(doc, "rates.1.thermal.criticalMaximum")[0]!.message).toContain('"s_a"');
    expect(issuesAt(doc, "climate.range.max")).toHaveLength(1);
  });

  it("infers a rate's scale from its value when none is given", () => {
    expect(rateScale({ value: 0.4 })).toBe("probability");
    expect(rateScale({ value: 12.5 })).toBe("non-negative");
    expect(rateScale({ value: -1.2 })).toBe("unbounded");
    expect(rateScale({ value: 0.4, scale: "non-negative" })).toBe("non-negative");
  });

  it("allows negative vital-rate values (coefficients on a logit scale)", () => {
    expect(LifeCycleSchema.parse(validDocument()).rates[4]!.value).toBe(-1.2);
  });

  it.each([
    ["stagewright", { stagewright: LIFE_CYCLE_SCHEMA_VERSION + 1 }],
    ["census", { census: "mid-breeding" }],
    ["timeStepUnit", { timeStepUnit: " " }],
    ["name", { name: "" }],
  ] as const)("refuses a bad %s", (path, change) => {
    expect(issuesAt({ ...validDocument(), ...change }, path)).toHaveLength(1);
  });

  it("refuses unknown fields", () => {
    expect(issuesOf({ ...validDocument(), colour: "red" })[0]).toMatchObject({ code: "unrecognized_keys", keys: ["colour"] });
    const doc = validDocument();
    (doc.stages[0] as Record<string, unknown>).selected = true;
    expect(issuesOf(doc)[0]).toMatchObject({ code: "unrecognized_keys", path: ["stages", 0] });
  });

  it("checks colours and positions", () => {
    const doc = validDocument();
    doc.stages[0] = { ...doc.stages[0]!, color: "red", position: { x: Number.NaN, y: 2e6 } };
    expect(issuesOf(doc).map((i) => i.path.join("."))).toEqual(expect.arrayContaining(["stages.0.color", "stages.0.position.x", "stages.0.position.y"]));
  });

  it("enforces the limits", () => {
    const stages = Array.from({ length: MAX_STAGES + 1 }, (_, i) => ({ id: `st_${i}`, name: `S${i}`, position: { x: 0, y: 0 } }));
    expect(issuesAt(validDocument({ stages, transitions: [] }), "stages")[0]!.message).toBe(`A life cycle has at most ${MAX_STAGES} stages.`);
    const rates = Array.from({ length: MAX_RATES + 1 }, (_, i) => ({ id: `vr_${i}`, name: `r${i}`, value: 0 }));
    expect(issuesAt(validDocument({ rates, transitions: [] }), "rates")).toHaveLength(1);
    expect(LifeCycleSchema.safeParse(validDocument({ stages: stages.slice(0, MAX_STAGES), transitions: [] })).success).toBe(true);
  });
});

describe("emptyLifeCycle", () => {
  it("makes a valid document of the current version", () => {
    const doc = emptyLifeCycle("  New model ");
    expect(doc).toEqual({ stagewright: LIFE_CYCLE_SCHEMA_VERSION, name: "New model", census: "pre-breeding", timeStepUnit: "year", stages: [], rates: [], transitions: [] });
    expect(emptyLifeCycle("x", { census: "post-breeding", timeStepUnit: "month" })).toMatchObject({ census: "post-breeding", timeStepUnit: "month" });
  });

  it("refuses an empty name", () => {
    expect(() => emptyLifeCycle(" ")).toThrow("Give the life cycle a name.");
  });
});

describe("newId", () => {
  it("makes prefixed ids that match the id pattern and do not repeat", () => {
    const ids = Array.from({ length: 2000 }, () => newId("st"));
    for (const id of ids) {
      expect(id).toMatch(/^st_[0-9a-z]{16}$/);
      expect(id).toMatch(ID_PATTERN);
    }
    expect(new Set(ids).size).toBe(ids.length);
  });

  it("uses the whole alphabet", () => {
    const chars = new Set(Array.from({ length: 200 }, () => newId("tr").slice(3)).join(""));
    expect(chars.size).toBe(32);
  });

  it("refuses a bad prefix", () => {
    expect(() => newId("ST")).toThrow(RangeError);
    expect(() => newId("")).toThrow(RangeError);
  });
});
