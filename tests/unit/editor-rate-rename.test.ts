import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { buildMatrices, formulaRateNames, LifeCycleSchema, type LifeCycle } from "../../shared/lifecycle";
import { formulaMentions, removeRateKeepingValues, renameInFormula, renameRate } from "../../src/features/rates/rename-rate";
import { arrowsUsingRates, parseNumberInput, probabilityWarnings, rateNameError } from "../../src/features/rates/rate-checks";

function lifeCycle(overrides: Partial<LifeCycle> = {}): LifeCycle {
  return LifeCycleSchema.parse({
    stagewright: 2,
    name: "Test population",
    census: "pre-breeding",
    timeStepUnit: "year",
    stages: [
      { id: "st_j", name: "Juvenile", position: { x: 0, y: 0 } },
      { id: "st_a", name: "Adult", position: { x: 200, y: 0 } },
    ],
    rates: [
      { id: "vr_sj", name: "s_j", value: 0.4 },
      { id: "vr_sj2", name: "s_j2", value: 0.5 },
      { id: "vr_sa", name: "s_a", value: 0.8 },
      { id: "vr_m", name: "m", value: 1.5 },
    ],
    transitions: [
      { id: "tr_1", from: "st_j", to: "st_a", kind: "growth", rate: "s_j * s_j2" },
      { id: "tr_2", from: "st_a", to: "st_a", kind: "stasis", rate: "s_a" },
      { id: "tr_3", from: "st_a", to: "st_j", kind: "reproduction", rate: "s_j*m" },
    ],
    ...overrides,
  });
}

describe("renameInFormula", () => {
  it("renames whole identifiers only", () => {
    expect(renameInFormula("s_j * (1 - s_j2) + xs_j", "s_j", "s_juv")).toBe("s_juv * (1 - s_j2) + xs_j");
    expect(renameInFormula("s_j2*s_j", "s_j", "q")).toBe("s_j2*q");
  });

  it("keeps spacing, numbers with exponents and function names as typed", () => {
    expect(renameInFormula("  exp( b0 )*1e5 + e5", "e5", "k")).toBe("  exp( b0 )*1e5 + k");
    expect(renameInFormula("invlogit(b0+b1*2.5e-3)", "b1", "slope")).toBe("invlogit(b0+slope*2.5e-3)");
  });

  it("leaves a formula without the name unchanged", () => {
    expect(renameInFormula("a + b", "c", "d")).toBe("a + b");
  });

  it("after renaming, the formula uses the new name wherever it used the old one, and nothing else changes", () => {
    const name = fc.constantFrom("a", "a1", "s_j", "s_j2", "b_0", "g");
    const piece = fc.oneof(name, fc.constantFrom("1", "0.5", "2e3", "exp(", "(", ")"));
    const op = fc.constantFrom(" + ", "*", " - ", "/", " ^ ");
    fc.assert(
      fc.property(fc.array(fc.tuple(piece, op), { minLength: 1, maxLength: 8 }), name, fc.constantFrom("new_name", "z9"), (parts, from, to) => {
        const formula = parts.map(([p, o]) => p + o).join("") + "1";
        const renamed = renameInFormula(formula, from, to);
        expect(formulaMentions(renamed, from)).toBe(false);
        expect(formulaMentions(renamed, to)).toBe(formulaMentions(formula, from));
        // Renaming back restores the text exactly (the new name was not used before).
        expect(renameInFormula(renamed, to, from)).toBe(formula);
        const before = formulaRateNames(formula);
        if (before.length > 0) expect(formulaRateNames(renamed)).toEqual(before.map((n) => (n === from ? to : n)));
      }),
    );
  });
});

describe("renameRate", () => {
  it("renames the rate and rewrites exactly the formulas that use it", () => {
    const doc = lifeCycle();
    const { document, changedArrows } = renameRate(doc, "vr_sj", "s_juv");
    expect(changedArrows).toEqual(["tr_1", "tr_3"]);
    expect(document.rates.map((r) => r.name)).toEqual(["s_juv", "s_j2", "s_a", "m"]);
    expect(document.transitions.map((t) => t.rate)).toEqual(["s_juv * s_j2", "s_a", "s_juv*m"]);
    expect(LifeCycleSchema.safeParse(document).success).toBe(true);
    // The input is not modified.
    expect(doc.transitions[0]!.rate).toBe("s_j * s_j2");
  });

  it("leaves the document as it is for an unknown id or the same name", () => {
    const doc = lifeCycle();
    expect(renameRate(doc, "vr_nope", "x").document).toBe(doc);
    expect(renameRate(doc, "vr_sj", "s_j").document).toBe(doc);
  });
});

describe("rate checks", () => {
  it("refuses invalid, reserved and duplicate names", () => {
    const doc = lifeCycle();
    expect(rateNameError(doc, "vr_sj", "s_juv")).toBeNull();
    expect(rateNameError(doc, "vr_sj", "s_j")).toBeNull();
    expect(rateNameError(doc, "vr_sj", "s_a")).toMatch(/already named s_a/);
    expect(rateNameError(doc, "vr_sj", "2s")).toMatch(/not a valid vital-rate name/);
    expect(rateNameError(doc, "vr_sj", "exp")).toMatch(/formula function/);
    expect(rateNameError(doc, "vr_sj", "")).toMatch(/cannot be empty/);
  });

  it("reads numbers as typed, with a decimal comma, and nothing else", () => {
    expect(parseNumberInput(" 0.25 ")).toBe(0.25);
    expect(parseNumberInput("1,5")).toBe(1.5);
    expect(parseNumberInput("-2e-3")).toBe(-0.002);
    expect(parseNumberInput("")).toBeNull();
    expect(parseNumberInput("0.2.1")).toBeNull();
    expect(parseNumberInput("1e999")).toBeNull();
    expect(parseNumberInput("abc")).toBeNull();
  });

  it("lists the arrows whose formulas use each rate", () => {
    const usage = arrowsUsingRates(lifeCycle());
    expect(usage.get("s_j")?.map((t) => t.id)).toEqual(["tr_1", "tr_3"]);
    expect(usage.get("s_a")?.map((t) => t.id)).toEqual(["tr_2"]);
    expect(usage.get("m")?.map((t) => t.id)).toEqual(["tr_3"]);
  });

  it("warns about a rate outside [0, 1] only where a survival arrow multiplies by it directly", () => {
    const doc = lifeCycle({
      rates: [
        { id: "vr_sj", name: "s_j", value: 40 },
        { id: "vr_sj2", name: "s_j2", value: 0.5 },
        { id: "vr_sa", name: "s_a", value: 1.2 },
        { id: "vr_m", name: "m", value: 3 },
        { id: "vr_g", name: "g", value: 2 },
      ],
      transitions: [
        { id: "tr_1", from: "st_j", to: "st_a", kind: "growth", rate: "s_j * s_j2" },
        { id: "tr_2", from: "st_a", to: "st_a", kind: "stasis", rate: "s_a * (1 - g / 10)" },
        // m > 1 is a fecundity: no warning, even though it is a bare factor here.
        { id: "tr_3", from: "st_a", to: "st_j", kind: "reproduction", rate: "s_j2 * m" },
      ],
    });
    const warnings = probabilityWarnings(doc);
    expect([...warnings.keys()].sort()).toEqual(["vr_sa", "vr_sj"]);
    expect(warnings.get("vr_sj")).toMatch(/Juvenile → Adult/);
    expect(warnings.get("vr_sj")).toMatch(/percentage/);
  });
});

describe("removeRateKeepingValues", () => {
  it("writes the removed rate's value into the formulas that used it, so the matrix is unchanged", () => {
    const doc = lifeCycle({ rates: [...lifeCycle().rates.slice(0, 3), { id: "vr_m", name: "m", value: -1.5 }] });
    const negative = removeRateKeepingValues(doc, "vr_m").document;
    expect(negative.transitions.find((t) => t.id === "tr_3")!.rate).toBe("s_j*(-1.5)");

    const before = lifeCycle();
    const { document, changedArrows } = removeRateKeepingValues(before, "vr_sj");
    expect(changedArrows).toEqual(["tr_1", "tr_3"]);
    expect(document.rates.map((r) => r.name)).toEqual(["s_j2", "s_a", "m"]);
    expect(document.transitions.map((t) => t.rate)).toEqual(["0.4 * s_j2", "s_a", "0.4*m"]);
    expect(LifeCycleSchema.safeParse(document).success).toBe(true);
    expect(buildMatrices(document).A).toEqual(buildMatrices(before).A);
    // A formula that was only the rate becomes a number.
    expect(removeRateKeepingValues(before, "vr_sa").document.transitions.find((t) => t.id === "tr_2")!.rate).toBe(0.8);
  });
});
