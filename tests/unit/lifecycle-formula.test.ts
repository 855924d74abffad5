import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  checkFormula,
  compileFormula,
  derivative,
  FormulaCompileError,
  FormulaEvaluationError,
  MAX_FORMULA_DEPTH,
  MAX_FORMULA_LENGTH,
  rateNameProblem,
  type FormulaError,
} from "../../shared/lifecycle";

const RATES = ["a", "b", "c", "s2", "g2", "s_juv"];

function errorsOf(formula: string, rates: readonly string[] = RATES): readonly FormulaError[] {
  const r = checkFormula(formula, rates);
  if (r.ok) throw new Error(`expected "${formula}" to be rejected`);
  return r.errors;
}

function evaluationErrorOf(formula: string, values: Record<string, number>): FormulaError {
  try {
    compileFormula(formula, Object.keys(values)).evaluate(values);
  } catch (err) {
    if (err instanceof FormulaEvaluationError) return err.detail;
    throw err;
  }
  throw new Error(`expected "${formula}" to fail at ${JSON.stringify(values)}`);
}

describe("formula evaluation", () => {
  const cases: [string, Record<string, number>, number][] = [
    ["s2 * (1 - g2)", { s2: 0.8, g2: 0.25 }, 0.8 * (1 - 0.25)],
    ["0.5", {}, 0.5],
    ["s_juv", { s_juv: 0.31 }, 0.31],
    ["a / b / c", { a: 12, b: 3, c: 2 }, 2],
    ["a - b - c", { a: 1, b: 2, c: 3 }, -4],
    ["2 ^ 3 ^ 2", {}, 512], // ^ is right-associative
    ["-2 ^ 2", {}, -4], // unary minus binds looser than ^
    ["(-2) ^ 2", {}, 4],
    ["+a - -b", { a: 1, b: 2 }, 3],
    ["1e-3 * a + .5", { a: 100 }, 0.6],
    ["exp(log(a))", { a: 3 }, 3],
    ["sqrt(16) + abs(-2)", {}, 6],
    ["min(0.9, a, b)", { a: 0.4, b: 0.7 }, 0.4],
    ["max(a, b, 0.5)", { a: 0.4, b: 0.7 }, 0.7],
    ["logit(0.75)", {}, Math.log(3)],
    ["invlogit(log(3))", {}, 0.75],
    ["invlogit(-800)", {}, 1 / (1 + Math.exp(800))],
    ["pi * e", {}, Math.PI * Math.E],
    ["a ^ 0.5", { a: 2 }, Math.SQRT2],
    ["  a  *  b  ", { a: 2, b: 3 }, 6],
  ];
  it.each(cases)("%s", (formula, values, expected) => {
    const compiled = compileFormula(formula, Object.keys(values));
    expect(compiled.evaluate(values)).toBeCloseTo(expected, 14);
  });

  it("lists the vital rates a formula uses, in order of first appearance", () => {
    expect(compileFormula("g2 * s2 + s2 * a").rateNames).toEqual(["g2", "s2", "a"]);
    expect(compileFormula("pi * 2").rateNames).toEqual([]);
  });

  it("reports a missing value by name", () => {
    const f = compileFormula("a * b", ["a", "b"]);
    let detail: FormulaError | undefined;
    try {
      f.evaluate({ a: 1 });
    } catch (err) {
      detail = (err as FormulaEvaluationError).detail;
    }
    expect(detail).toMatchObject({ code: "missing-value", name: "b" });
    expect(() => f.evaluate({ a: 1, b: Number.NaN })).toThrow(/b must be a finite number/);
  });
});

describe("formula checks", () => {
  // Each disallowed construct, with the 0-based position of its telltale character.
  const disallowed: [string, FormulaError["code"], number | undefined, string | undefined][] = [
    ["x = 1", "not-allowed", 2, undefined],
    ["f(x) = x", "not-allowed", 5, undefined],
    ["import(a)", "unknown-function", 0, "import"],
    ["a.b", "not-allowed", 1, undefined],
    ["[1,2]", "not-allowed", 0, undefined],
    ['"str"', "not-allowed", 0, undefined],
    ['evaluate("1")', "unknown-function", 0, "evaluate"],
    ["a * foo(b)", "unknown-function", 4, "foo"],
    ["a[1]", "not-allowed", 1, undefined],
    ["{x: 1}", "not-allowed", 0, undefined],
    ["a ? b : c", "not-allowed", 2, undefined],
    ["a == b", "not-allowed", 2, "=="],
    ["a < b", "not-allowed", 2, "<"],
    ["1:3", "not-allowed", 1, undefined],
    ["a; b", "not-allowed", 1, undefined],
    ["a\nb", "not-allowed", 1, undefined],
    ["a # note", "not-allowed", 2, undefined], // mathjs would drop the rest as a comment
    ["50%", "not-allowed", 2, undefined], // mathjs would read 0.5
    ["a mod 2", "not-allowed", 2, "mod"],
    ["a and b", "not-allowed", 2, "and"],
    ["true", "not-allowed", 0, "true"],
    ["Infinity * a", "not-allowed", 0, "Infinity"],
    ["1e400", "not-allowed", 0, undefined],
    ["2 a", "implicit-multiplication", 2, undefined],
    ["(a + b) c", "implicit-multiplication", 8, undefined],
    ["2 (b + c)", "implicit-multiplication", 2, undefined],
    ["exp + 1", "function-without-call", 0, "exp"],
    ["log(a, 2)", "wrong-arity", 0, "log"],
    ["min(a)", "wrong-arity", 0, "min"],
    ["exp(a, b)", "wrong-arity", 0, "exp"],
  ];
  it.each(disallowed)("rejects %j", (formula, code, position, name) => {
    const [first] = errorsOf(formula);
    expect(first).toMatchObject({ code, formula });
    expect(first?.position).toBe(position);
    expect(first?.name).toBe(name);
    expect(first?.message.length).toBeGreaterThan(10);
  });

  it("names an unknown vital rate and where it is", () => {
    expect(errorsOf("s2 * (1 - g3)")).toEqual([
      {
        code: "unknown-rate",
        formula: "s2 * (1 - g3)",
        name: "g3",
        position: 10,
        message: 'Unknown vital rate "g3" at character 11: add it in the Rates table or correct the name.',
      },
    ]);
  });

  it("reports every unknown vital rate once, at its first occurrence", () => {
    const errors = errorsOf("x * y + x", ["a"]);
    expect(errors.map((e) => [e.name, e.position])).toEqual([
      ["x", 0],
      ["y", 4],
    ]);
  });

  it("finds the symbol, not a longer name containing it", () => {
    expect(errorsOf("s2x + s2 * q", ["s2x", "s2"])[0]).toMatchObject({ name: "q", position: 11 });
  });

  it("explains a vital rate written like a function call", () => {
    const [e] = errorsOf("s2(1 - g2)");
    expect(e).toMatchObject({ code: "unknown-function", name: "s2" });
    expect(e?.message).toContain("s2 is a vital rate, not a function");
  });

  it.each([
    ["1 +", 3],
    ["(a + b", 6],
    ["a * * b", 4],
    ["1 + )", 4],
    ["2 * (a + b))", 11],
    ["a @ b", 2],
  ] as const)("gives the position of the syntax error in %j", (formula, position) => {
    const [e] = errorsOf(formula);
    expect(e).toMatchObject({ code: "syntax", position });
    expect(e?.message).toContain(`at character ${position + 1}`);
  });

  it("rejects empty, too long and too deeply nested formulas", () => {
    expect(errorsOf("   ")[0]?.code).toBe("empty");
    const long = `${"a+".repeat(MAX_FORMULA_LENGTH / 2)}a`;
    expect(long.length).toBe(MAX_FORMULA_LENGTH + 1);
    expect(errorsOf(long)[0]?.code).toBe("too-long");
    expect(checkFormula(long.slice(2), RATES).ok).toBe(true);
    const deep = (d: number) => `${"(".repeat(d)}a${")".repeat(d)}`;
    expect(checkFormula(deep(MAX_FORMULA_DEPTH), RATES).ok).toBe(true);
    expect(errorsOf(deep(MAX_FORMULA_DEPTH + 1))[0]).toMatchObject({ code: "too-deep", position: MAX_FORMULA_DEPTH });
    // Long chains are fine up to the length limit.
    expect(compileFormula(`${"-".repeat(MAX_FORMULA_LENGTH - 2)}a`).evaluate({ a: 2 })).toBe(2);
  });

  it("compileFormula throws the structured errors", () => {
    expect(() => compileFormula("a +")).toThrow(FormulaCompileError);
    try {
      compileFormula("a * q", ["a"]);
    } catch (err) {
      expect((err as FormulaCompileError).errors[0]).toMatchObject({ code: "unknown-rate", name: "q", position: 4 });
    }
    expect.assertions(2);
  });

  it("checks vital-rate names", () => {
    for (const bad of ["", "2x", "a-b", "a b", "s.1", "φ", "exp", "logit", "pi", "e", "mod", "NaN", "Infinity", "true", "x".repeat(65)]) {
      expect(rateNameProblem(bad), bad).not.toBeNull();
    }
    for (const good of ["s", "s_juv", "_x", "G2", "E", "Pi", "x".repeat(64)]) {
      expect(rateNameProblem(good), good).toBeNull();
    }
  });
});

describe("formula evaluation errors", () => {
  it("reports division by zero with the divisor", () => {
    const e = evaluationErrorOf("a / (b - c)", { a: 1, b: 2, c: 2 });
    expect(e).toMatchObject({ code: "division-by-zero", formula: "a / (b - c)" });
    expect(e.message).toContain('"b - c" is 0');
  });

  it("reports a division by zero even where min would hide the infinity", () => {
    expect(evaluationErrorOf("min(1, a / b)", { a: 1, b: 0 }).code).toBe("division-by-zero");
    expect(evaluationErrorOf("a ^ -1", { a: 0 }).code).toBe("division-by-zero");
  });

  it.each([
    ["log(a)", { a: 0 }, "log needs a positive argument"],
    ["sqrt(a - b)", { a: 1, b: 2 }, "sqrt needs a non-negative argument"],
    ["logit(a)", { a: 1 }, "logit needs an argument strictly between 0 and 1"],
    ["exp(a)", { a: 1000 }, "no finite value"],
    ["(a - b) ^ 0.5", { a: 1, b: 2 }, "negative number raised to a fractional power"],
    ["a * b", { a: 1e200, b: 1e200 }, "no finite value"],
  ] as const)("reports %s at %j as not finite", (formula, values, text) => {
    const e = evaluationErrorOf(formula, values);
    expect(e.code).toBe("not-finite");
    expect(e.message).toContain(text);
  });
});

/** Central finite difference of a formula with respect to one rate. */
function centralDifference(formula: string, name: string, values: Record<string, number>): number {
  const f = compileFormula(formula, Object.keys(values));
  const x = values[name]!;
  const h = 1e-6 * Math.max(1, Math.abs(x));
  return (f.evaluate({ ...values, [name]: x + h }) - f.evaluate({ ...values, [name]: x - h })) / (2 * h);
}

describe("derivatives", () => {
  const at = { a: 0.7, b: 1.3, c: 0.4 };
  const formulas = [
    "a * b * c",
    "a / (b + c)",
    "b / a ^ 2",
    "a ^ b",
    "b ^ (a * c)",
    "exp(a * b) / (1 + exp(a * b))",
    "log(a + b) * sqrt(c + a)",
    "logit(a) + logit(c * a)",
    "invlogit(a - 2 * b + c)",
    "min(a, b, c * 2)",
    "max(a * b, c + 0.2, 0.1)",
    "abs(a - b) * c",
    "-a ^ 2 + (-(b - c)) * pi",
    "s2 * (1 - g2)",
  ];
  it.each(formulas)("d/dx of %s matches central finite differences", (formula) => {
    const values = formula.includes("s2") ? { s2: 0.8, g2: 0.3 } : at;
    for (const name of Object.keys(values)) {
      const d = derivative(formula, name).evaluate(values);
      const fd = centralDifference(formula, name, values);
      expect(Math.abs(d - fd), `${formula} by ${name}: ${d} vs ${fd}`).toBeLessThan(1e-6 * Math.max(1, Math.abs(fd)));
    }
  });

  it("gives exact simple derivatives", () => {
    expect(derivative("s2 * (1 - g2)", "g2").formula).toBe("-s2");
    expect(derivative("s2 * (1 - g2)", "s2").formula).toBe("1 - g2");
    expect(derivative("a / b", "b").formula).toBe("-(a / b ^ 2)");
    expect(derivative("3 * a", "b").formula).toBe("0");
    expect(derivative("3 * a", "b").evaluate({})).toBe(0);
  });

  it("takes the central value at a kink of min, max and abs", () => {
    // One-sided derivatives of min(a, b) at a = b are 1 and 0; central differences give 1/2.
    expect(derivative("min(a, b)", "a").evaluate({ a: 0.5, b: 0.5 })).toBe(0.5);
    expect(centralDifference("min(a, b)", "a", { a: 0.5, b: 0.5 })).toBeCloseTo(0.5, 9);
    expect(derivative("max(a, 1)", "a").evaluate({ a: 1 })).toBe(0.5);
    expect(derivative("abs(a)", "a").evaluate({ a: 0 })).toBe(0);
    expect(derivative("abs(a)", "a").evaluate({ a: -2 })).toBe(-1);
  });

  it("reports an infinite derivative as an evaluation error", () => {
    expect(() => derivative("sqrt(a)", "a").evaluate({ a: 0 })).toThrow(FormulaEvaluationError);
  });

  it("refuses to differentiate an invalid formula", () => {
    expect(() => derivative("a +", "a")).toThrow(FormulaCompileError);
  });

  it("treats rate names that mean something to mathjs as plain names", () => {
    // i, E, phi and tau are constants inside mathjs; here they are vital rates.
    const values = { i: 0.3, E: 0.5, phi: 2, tau: 0.1 };
    const formula = "i * E + phi ^ tau";
    expect(compileFormula(formula, Object.keys(values)).evaluate(values)).toBeCloseTo(0.15 + 2 ** 0.1, 14);
    for (const name of Object.keys(values)) {
      expect(derivative(formula, name).evaluate(values)).toBeCloseTo(centralDifference(formula, name, values), 7);
    }
  });
});

// Random expression trees: the compiled formula must agree with a direct
// evaluation of the same tree, and its derivative with finite differences.
type Tree = { op: "num"; v: number } | { op: "var"; name: "a" | "b" | "c" } | { op: "+" | "-" | "*"; l: Tree; r: Tree } | { op: "exp" | "sq" | "inv"; x: Tree };

const treeArb: fc.Arbitrary<Tree> = fc.letrec<{ tree: Tree }>((tie) => ({
  tree: fc.oneof(
    { depthSize: "small", withCrossShrink: true },
    fc.record({ op: fc.constant("num" as const), v: fc.double({ min: 0.1, max: 3, noNaN: true }) }),
    fc.record({ op: fc.constant("var" as const), name: fc.constantFrom("a" as const, "b" as const, "c" as const) }),
    fc.record({ op: fc.constantFrom("+" as const, "-" as const, "*" as const), l: tie("tree"), r: tie("tree") }),
    fc.record({ op: fc.constantFrom("exp" as const, "sq" as const, "inv" as const), x: tie("tree") }),
  ),
})).tree;

function render(t: Tree): string {
  switch (t.op) {
    case "num":
      return String(t.v);
    case "var":
      return t.name;
    case "exp":
      return `exp(${render(t.x)} / 4)`;
    case "sq":
      return `sqrt(1 + (${render(t.x)}) ^ 2)`;
    case "inv":
      return `invlogit(${render(t.x)})`;
    default:
      return `(${render(t.l)} ${t.op} ${render(t.r)})`;
  }
}

function direct(t: Tree, v: Record<"a" | "b" | "c", number>): number {
  switch (t.op) {
    case "num":
      return t.v;
    case "var":
      return v[t.name];
    case "exp":
      return Math.exp(direct(t.x, v) / 4);
    case "sq":
      return Math.sqrt(1 + direct(t.x, v) ** 2);
    case "inv":
      return 1 / (1 + Math.exp(-direct(t.x, v)));
    case "+":
      return direct(t.l, v) + direct(t.r, v);
    case "-":
      return direct(t.l, v) - direct(t.r, v);
    case "*":
      return direct(t.l, v) * direct(t.r, v);
  }
}

describe("random formulas", () => {
  const point = fc.record({ a: fc.double({ min: 0.2, max: 2, noNaN: true }), b: fc.double({ min: 0.2, max: 2, noNaN: true }), c: fc.double({ min: 0.2, max: 2, noNaN: true }) });

  it("evaluate like a direct computation of the same expression", () => {
    fc.assert(
      fc.property(treeArb, point, (tree, values) => {
        const expected = direct(tree, values);
        fc.pre(Number.isFinite(expected) && Math.abs(expected) < 1e12);
        const actual = compileFormula(render(tree), ["a", "b", "c"]).evaluate(values);
        expect(Math.abs(actual - expected)).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(expected)));
      }),
      { seed: 20240611, numRuns: 300 },
    );
  });

  it("have derivatives that match central finite differences", () => {
    fc.assert(
      fc.property(treeArb, point, fc.constantFrom("a" as const, "b" as const, "c" as const), (tree, values, name) => {
        const formula = render(tree);
        fc.pre(formula.length <= MAX_FORMULA_LENGTH && Math.abs(direct(tree, values)) < 1e6);
        const d = derivative(formula, name).evaluate(values);
        const fd = centralDifference(formula, name, values);
        expect(Math.abs(d - fd)).toBeLessThanOrEqual(1e-5 * Math.max(1, Math.abs(fd)));
      }),
      { seed: 20240612, numRuns: 200 },
    );
  });
});

describe("the formula code stays safe", () => {
  // User text must never reach eval, Function or mathjs's own evaluator.
  const dir = join(import.meta.dirname, "../../shared/lifecycle");
  const sources = readdirSync(dir)
    .filter((f) => f.endsWith(".ts"))
    .map((f) => ({ file: f, text: readFileSync(join(dir, f), "utf8") }));

  it("reads the life-cycle sources", () => {
    expect(sources.map((s) => s.file)).toContain("formula.ts");
  });

  it.each([/\beval\s*\(/, /\bnew\s+Function\b/, /(^|[^\w.])Function\s*\(/])("no source matches %s", (pattern) => {
    for (const { file, text } of sources) expect(pattern.test(text), `${file} matches ${pattern}`).toBe(false);
  });

  it("imports only parse, derivative and node constructors from mathjs", () => {
    const allowed = new Set(["parse", "derivative", "ConstantNode", "FunctionNode", "OperatorNode", "SymbolNode", "MathNode"]);
    for (const { file, text } of sources) {
      for (const m of text.matchAll(/import\s*\{([^}]*)\}\s*from\s*"mathjs"/g)) {
        const names = m[1]!
          .split(",")
          .map((s) => s.trim().replace(/^type\s+/, "").split(/\s+as\s+/)[0]!)
          .filter(Boolean);
        for (const name of names) expect(allowed.has(name), `${file} imports ${name} from mathjs`).toBe(true);
      }
      expect(/from\s*"mathjs\//.test(text), `${file} imports a mathjs subpath`).toBe(false);
    }
  });
});
