import { describe, expect, it } from "vitest";
import { lambdaVerdict, perStep, steps } from "../../src/lib/verdict";

describe("lambdaVerdict", () => {
  it("says declining, stable or growing with the change per time step", () => {
    // Loggerhead sea turtle, Crouse, Crowder & Caswell 1987: λ = 0.9450 (METHODS.md §1).
    expect(lambdaVerdict(0.945, "year").headline).toBe("declining about 5.5 % a year");
    expect(lambdaVerdict(1.031, "year").headline).toBe("growing about 3.1 % a year");
    expect(lambdaVerdict(1.0004, "year")).toMatchObject({ trend: "stable", headline: "stable" });
    expect(lambdaVerdict(0.9996, "year").trend).toBe("stable");
    expect(lambdaVerdict(1.0006, "year").headline).toBe("growing about 0.1 % a year");
  });

  it("rounds large changes to whole percentages", () => {
    // Teasel, Werner & Caswell 1977 as analysed in Caswell 2001: λ = 2.3339.
    expect(lambdaVerdict(2.3339, "year").headline).toBe("growing about 133 % a year");
    expect(lambdaVerdict(0.5, "month").headline).toBe("declining about 50 % a month");
  });

  it("gives the doubling or halving time in the time-step unit", () => {
    expect(lambdaVerdict(2, "year").detail).toBe("At this rate numbers double about every 1.0 years.");
    expect(lambdaVerdict(0.5, "month").detail).toBe("At this rate numbers halve about every 1.0 months.");
    expect(lambdaVerdict(1.031, "year").detail).toBe("At this rate numbers double about every 23 years.");
  });

  it("says when the population dies out", () => {
    expect(lambdaVerdict(0, "year")).toMatchObject({ trend: "dying-out", headline: "dying out" });
  });
});

describe("time-step words", () => {
  it("picks the article and plural, and falls back for compound units", () => {
    expect(perStep("year")).toBe("a year");
    expect(perStep("hour")).toBe("an hour");
    expect(perStep("2 years")).toBe("per 2 years");
    expect(steps("1", "year")).toBe("1 year");
    expect(steps("3.5", "day")).toBe("3.5 days");
    expect(steps("4", "2 years")).toBe("4 time steps (of 2 years)");
  });
});
