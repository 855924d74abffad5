import { describe, expect, it } from "vitest";
import { analyzeMatrix } from "../../shared/demography";
import { buildMatrices } from "../../shared/lifecycle";
import { sizeClassLifeCycle } from "../../bench/editor";

describe("balancing", () => {
  it("finishes when running sums drift below zero (a 50-class model once hung the analysis)", () => {
    // The editor benchmark's invented 50-class model with the rates that made
    // balance()'s column sum drift to −2.4e−19 inside the life-history step.
    const base = sizeClassLifeCycle();
    const values: Record<string, number> = { m_7: 3, m_8: 4.5, m_9: 6, m_10: 8, e_0: 0.08, e_1: 0.01 };
    for (let i = 0; i < 10; i++) {
      values[`s_${i + 1}`] = +(0.3 + 0.065 * i).toFixed(4);
      values[`g_${i + 1}`] = +(0.5 - 0.04 * i).toFixed(4);
    }
    const doc = { ...base, rates: base.rates.map((r) => (r.name in values ? { ...r, value: values[r.name]! } : r)) };
    const m = buildMatrices(doc);
    const full = analyzeMatrix({ A: m.A, U: m.U, F: m.F });
    expect(full.lambda).toBeCloseTo(analyzeMatrix({ A: m.A }).lambda, 12);
    expect(full.lifeHistory?.netReproductiveRate).toBeGreaterThan(0);
  });
});
