/**
 * Rate formulas: an arrow's rate written in terms of named vital rates,
 * e.g. `s2 * (1 - g2)` or `invlogit(b0 + b1 * 3)`.
 *
 * The language is deliberately small: numbers, vital-rate names, the
 * constants `pi` and `e`, parentheses, `+ - * / ^`, unary minus and plus,
 * and the functions in FORMULA_FUNCTIONS. mathjs parses the text; we walk
 * its node tree against that allow-list, build our own small tree and
 * evaluate it with closures. Nothing evaluates user text with eval,
 * Function or mathjs's own evaluate.
 *
 * Derivatives come from mathjs `derivative` applied to a translation of our
 * tree in which vital-rate names are replaced by neutral placeholders (so no
 * rate name can collide with a mathjs constant) and our own functions are
 * rewritten in terms of functions mathjs can differentiate (see
 * `toMathNode`).
 */
import {
  ConstantNode,
  FunctionNode,
  OperatorNode,
  SymbolNode,
  derivative as mathDerivative,
  parse as mathParse,
  type MathNode,
} from "mathjs";

// ---------------------------------------------------------------- language

/** Longest formula text accepted (characters). */
export const MAX_FORMULA_LENGTH = 1000;
/**
 * Deepest nesting of parentheses and function calls accepted (mathjs parses
 * nesting recursively). Other chains, like a long sum or repeated unary
 * minus, are bounded by MAX_FORMULA_LENGTH and handled at that depth.
 */
export const MAX_FORMULA_DEPTH = 32;
/** Longest vital-rate name accepted (characters). */
export const MAX_RATE_NAME_LENGTH = 64;

/** A vital-rate name: an ASCII letter or underscore, then letters, digits or underscores. */
export const RATE_NAME_PATTERN = /^[A-Za-z_][A-Za-z0-9_]*$/;

/** The functions a formula may call, with their arity. */
export const FORMULA_FUNCTIONS = {
  exp: { minArgs: 1, maxArgs: 1, summary: "exp(x): e to the power x" },
  log: { minArgs: 1, maxArgs: 1, summary: "log(x): natural logarithm, x > 0" },
  sqrt: { minArgs: 1, maxArgs: 1, summary: "sqrt(x): square root, x ≥ 0" },
  abs: { minArgs: 1, maxArgs: 1, summary: "abs(x): absolute value" },
  min: { minArgs: 2, maxArgs: Infinity, summary: "min(x, y, …): smallest argument" },
  max: { minArgs: 2, maxArgs: Infinity, summary: "max(x, y, …): largest argument" },
  logit: { minArgs: 1, maxArgs: 1, summary: "logit(p): log(p / (1 − p)), 0 < p < 1" },
  invlogit: { minArgs: 1, maxArgs: 1, summary: "invlogit(x): 1 / (1 + exp(−x)), the inverse of logit" },
} as const satisfies Record<string, { minArgs: number; maxArgs: number; summary: string }>;

export type FormulaFunction = keyof typeof FORMULA_FUNCTIONS;

/** Named constants a formula may use. */
export const FORMULA_CONSTANTS: Readonly<Record<string, number>> = Object.freeze({ pi: Math.PI, e: Math.E });

/**
 * Words that cannot name a vital rate: our functions and constants, and the
 * words the parser reads as operators or literals.
 */
export const RESERVED_NAMES: ReadonlySet<string> = new Set([
  ...Object.keys(FORMULA_FUNCTIONS),
  ...Object.keys(FORMULA_CONSTANTS),
  // read by the parser as operators or literal values, never as names
  "mod", "to", "in", "and", "or", "xor", "not",
  "true", "false", "null", "undefined", "NaN", "Infinity",
]);

const FUNCTION_NAMES = Object.keys(FORMULA_FUNCTIONS).join(", ");

function isFormulaFunction(name: string): name is FormulaFunction {
  return Object.hasOwn(FORMULA_FUNCTIONS, name);
}

/** Why a name cannot be a vital-rate name, or null when it can. */
export function rateNameProblem(name: string): string | null {
  if (name.length === 0) return "A vital-rate name cannot be empty.";
  if (name.length > MAX_RATE_NAME_LENGTH) return `A vital-rate name has at most ${MAX_RATE_NAME_LENGTH} characters.`;
  if (!RATE_NAME_PATTERN.test(name)) {
    return `"${name}" is not a valid vital-rate name: start with a letter or underscore and use only letters, digits and underscores (for example s_juv or g2).`;
  }
  if (isFormulaFunction(name)) return `"${name}" is the name of a formula function; choose another name for the vital rate.`;
  if (Object.hasOwn(FORMULA_CONSTANTS, name)) return `"${name}" is a constant in formulas; choose another name for the vital rate.`;
  if (RESERVED_NAMES.has(name)) return `"${name}" is a reserved word in formulas; choose another name for the vital rate.`;
  return null;
}

// ------------------------------------------------------------------ errors

export type FormulaErrorCode =
  | "empty"
  | "too-long"
  | "too-deep"
  | "syntax"
  | "not-allowed"
  | "implicit-multiplication"
  | "unknown-rate"
  | "unknown-function"
  | "function-without-call"
  | "wrong-arity"
  | "division-by-zero"
  | "not-finite"
  | "negative"
  | "missing-value";

/** A problem with a formula, precise enough to point at it in the editor. */
export interface FormulaError {
  code: FormulaErrorCode;
  /** The formula text as written. */
  formula: string;
  /** 0-based character index in `formula`, when known. */
  position?: number;
  /** The unknown or disallowed name, when the error is about a name. */
  name?: string;
  message: string;
}

/** Thrown when a formula cannot be compiled (syntax, disallowed constructs, unknown names). */
export class FormulaCompileError extends Error {
  override readonly name = "FormulaCompileError";
  constructor(readonly errors: readonly FormulaError[]) {
    super(errors.map((e) => e.message).join(" "));
  }
}

/** Thrown when a formula has no finite value at the given vital-rate values. */
export class FormulaEvaluationError extends Error {
  override readonly name = "FormulaEvaluationError";
  constructor(readonly detail: FormulaError) {
    super(detail.message);
  }
}

// ---------------------------------------------------------------- our tree

/** Our own expression tree; `sign` only appears in derivatives. */
export type Expr =
  | { readonly k: "num"; readonly v: number }
  | { readonly k: "rate"; readonly name: string }
  | { readonly k: "neg"; readonly a: Expr }
  | { readonly k: "add" | "sub" | "mul" | "div" | "pow"; readonly a: Expr; readonly b: Expr }
  | { readonly k: "call"; readonly fn: FormulaFunction; readonly args: readonly Expr[] }
  | { readonly k: "sign"; readonly a: Expr };

const BINARY_SYMBOL = { add: "+", sub: "-", mul: "*", div: "/", pow: "^" } as const;
const PRECEDENCE = { add: 1, sub: 1, mul: 2, div: 2, neg: 3, pow: 4, atom: 5 } as const;

function precedence(e: Expr): number {
  switch (e.k) {
    case "num":
      return e.v < 0 ? PRECEDENCE.neg : PRECEDENCE.atom;
    case "rate":
    case "call":
    case "sign":
      return PRECEDENCE.atom;
    case "neg":
      return PRECEDENCE.neg;
    default:
      return PRECEDENCE[e.k];
  }
}

/** Formula text of a tree, with only the parentheses it needs. */
export function printExpr(e: Expr): string {
  const wrap = (child: Expr, needs: boolean) => (needs ? `(${printExpr(child)})` : printExpr(child));
  switch (e.k) {
    case "num":
      return String(e.v);
    case "rate":
      return e.name;
    case "neg":
      return `-${wrap(e.a, precedence(e.a) < PRECEDENCE.pow)}`;
    case "call":
      return `${e.fn}(${e.args.map(printExpr).join(", ")})`;
    case "sign":
      return `sign(${printExpr(e.a)})`;
    case "pow":
      // right-associative: a ^ (b ^ c) prints as a ^ b ^ c
      return `${wrap(e.a, precedence(e.a) <= PRECEDENCE.pow)} ^ ${wrap(e.b, precedence(e.b) < PRECEDENCE.pow)}`;
    default: {
      const p = PRECEDENCE[e.k];
      const rightNeeds = precedence(e.b) < p || (precedence(e.b) === p && (e.k === "sub" || e.k === "div"));
      return `${wrap(e.a, precedence(e.a) < p)} ${BINARY_SYMBOL[e.k]} ${wrap(e.b, rightNeeds)}`;
    }
  }
}

// --------------------------------------------------------------- tokenizer
// Only used to find where a problem is in the text: mathjs nodes carry no
// character positions.

interface Token {
  readonly text: string;
  readonly start: number;
  readonly kind: "identifier" | "number" | "string" | "other";
}

const TOKEN = /\s+|("(?:[^"\\]|\\.)*"?|'(?:[^'\\]|\\.)*'?)|((?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)|([\p{L}_$][\p{L}\p{N}_$]*)|(==|!=|<=|>=|\.\*|\.\/|\.\^|[\s\S])/uy;

function tokenize(text: string): Token[] {
  const tokens: Token[] = [];
  TOKEN.lastIndex = 0;
  let m: RegExpExecArray | null;
  while (TOKEN.lastIndex < text.length && (m = TOKEN.exec(text)) !== null) {
    const [whole, str, num, ident] = m;
    if (str !== undefined) tokens.push({ text: whole, start: m.index, kind: "string" });
    else if (num !== undefined) tokens.push({ text: whole, start: m.index, kind: "number" });
    else if (ident !== undefined) tokens.push({ text: whole, start: m.index, kind: "identifier" });
    else if (whole.trim() !== "") tokens.push({ text: whole, start: m.index, kind: "other" });
    else if (/[\r\n]/.test(whole)) tokens.push({ text: "\n", start: m.index + whole.search(/[\r\n]/), kind: "other" });
  }
  return tokens;
}

function nextToken(tokens: readonly Token[], i: number): Token | undefined {
  return tokens[i + 1];
}

/** Position of the first identifier `name` (called as a function when `call` says so). */
function identifierPosition(tokens: readonly Token[], name: string, call?: boolean): number | undefined {
  let fallback: number | undefined;
  for (let i = 0; i < tokens.length; i++) {
    const t = tokens[i]!;
    if (t.kind !== "identifier" || t.text !== name) continue;
    const isCall = nextToken(tokens, i)?.text === "(";
    if (call === undefined || call === isCall) return t.start;
    fallback ??= t.start;
  }
  return fallback;
}

/** Where two values stand side by side (`2 x`, `a b`, `(a)(b)`), the start of the second. */
function juxtapositionPosition(tokens: readonly Token[]): number | undefined {
  for (let i = 1; i < tokens.length; i++) {
    const prev = tokens[i - 1]!;
    const next = tokens[i]!;
    const prevEndsValue = prev.kind === "number" || prev.kind === "identifier" || prev.text === ")";
    const nextStartsValue = next.kind === "number" || next.kind === "identifier" || (next.text === "(" && prev.kind !== "identifier");
    if (prevEndsValue && nextStartsValue) return next.start;
  }
  return undefined;
}

function firstTokenPosition(tokens: readonly Token[], test: (t: Token) => boolean): number | undefined {
  return tokens.find(test)?.start;
}

// ----------------------------------------------------------------- parsing

type ParseResult =
  | { readonly ok: true; readonly expr: Expr; readonly symbols: readonly string[] }
  | { readonly ok: false; readonly errors: readonly FormulaError[] };

/** A small least-recently-used cache: the editor re-validates on every keystroke. */
class Lru<V> {
  private readonly map = new Map<string, V>();
  constructor(private readonly capacity: number) {}
  get(key: string): V | undefined {
    const v = this.map.get(key);
    if (v !== undefined) {
      this.map.delete(key);
      this.map.set(key, v);
    }
    return v;
  }
  set(key: string, v: V): void {
    this.map.delete(key);
    this.map.set(key, v);
    if (this.map.size > this.capacity) this.map.delete(this.map.keys().next().value as string);
  }
}

const FORMULA_CACHE_SIZE = 2000;
const parseCache = new Lru<ParseResult>(FORMULA_CACHE_SIZE);
const derivativeCache = new Lru<Expr>(FORMULA_CACHE_SIZE);

// Parser keywords that stand for operators; none is allowed in a formula.
const NAMED_OPERATORS = new Set(["mod", "to", "in", "and", "or", "xor", "not"]);

const ALLOWED_OPERATORS: Readonly<Record<string, Expr["k"] | "plus">> = {
  add: "add",
  subtract: "sub",
  multiply: "mul",
  divide: "div",
  pow: "pow",
  unaryMinus: "neg",
  unaryPlus: "plus",
};

interface ParseContext {
  readonly text: string;
  readonly tokens: Token[];
  readonly errors: FormulaError[];
  readonly symbols: string[];
}

function addError(ctx: ParseContext, error: Omit<FormulaError, "formula">): null {
  const duplicate = ctx.errors.some((e) => e.code === error.code && e.name === error.name && e.position === error.position);
  if (!duplicate) ctx.errors.push({ formula: ctx.text, ...error });
  return null;
}

function notAllowed(ctx: ParseContext, message: string, position: number | undefined, name?: string): null {
  return addError(ctx, { code: "not-allowed", message, ...(position === undefined ? {} : { position }), ...(name === undefined ? {} : { name }) });
}

/** Turns a mathjs node into our tree, checking it against the allow-list. */
function fromMathNode(node: MathNode, ctx: ParseContext): Expr | null {
  const t = ctx.tokens;
  switch (node.type) {
    case "ConstantNode": {
      const value = (node as unknown as { value: unknown }).value;
      if (typeof value === "number") {
        if (Number.isFinite(value)) return { k: "num", v: value };
        const word = Number.isNaN(value) ? "NaN" : "Infinity";
        const written = identifierPosition(t, word); // the word itself, or a number too large (1e400)
        const pos = written ?? firstTokenPosition(t, (x) => x.kind === "number");
        return notAllowed(ctx, `${word === "NaN" ? "NaN" : "An infinite number"} cannot be used in a formula; rates must be finite numbers.`, pos, written === undefined ? undefined : word);
      }
      if (typeof value === "string") {
        return notAllowed(ctx, "Text in quotes is not allowed in a formula; use numbers and vital-rate names.", firstTokenPosition(t, (x) => x.kind === "string"));
      }
      const word = String(value);
      return notAllowed(ctx, `"${word}" is not allowed in a formula; use numbers and vital-rate names.`, identifierPosition(t, word), word);
    }
    case "SymbolNode": {
      const name = (node as unknown as { name: string }).name;
      const constant = FORMULA_CONSTANTS[name];
      if (constant !== undefined && Object.hasOwn(FORMULA_CONSTANTS, name)) return { k: "num", v: constant };
      if (isFormulaFunction(name)) {
        const pos = identifierPosition(t, name, false);
        return addError(ctx, { code: "function-without-call", name, message: `${name} is a function: call it with an argument, as in ${name}(x).`, ...(pos === undefined ? {} : { position: pos }) });
      }
      if (!ctx.symbols.includes(name)) ctx.symbols.push(name);
      return { k: "rate", name };
    }
    case "ParenthesisNode":
      return fromMathNode((node as unknown as { content: MathNode }).content, ctx);
    case "OperatorNode": {
      const op = node as unknown as { fn: string; op: string; args: MathNode[]; implicit: boolean };
      if (op.implicit) {
        const pos = juxtapositionPosition(t);
        return addError(ctx, {
          code: "implicit-multiplication",
          message: `Write * between factors: "${node.toString()}" has two values side by side. For a product write a * b; a vital rate cannot be called like a function.`,
          ...(pos === undefined ? {} : { position: pos }),
        });
      }
      const kind = ALLOWED_OPERATORS[op.fn];
      if (kind === undefined) {
        const pos = NAMED_OPERATORS.has(op.op) ? identifierPosition(t, op.op) : firstTokenPosition(t, (x) => x.kind === "other" && x.text === op.op);
        return notAllowed(ctx, `The operator "${op.op}" is not allowed in a formula; use + - * / ^ and the functions ${FUNCTION_NAMES}.`, pos, op.op);
      }
      const args = op.args.map((a) => fromMathNode(a, ctx));
      const [a, b] = args;
      if (args.some((x) => x === null) || a === undefined || a === null) return null;
      if (kind === "plus") return a;
      if (kind === "neg") return { k: "neg", a };
      if (b === undefined || b === null) return null;
      return { k: kind as "add" | "sub" | "mul" | "div" | "pow", a, b };
    }
    case "FunctionNode": {
      const fnNode = node as unknown as { fn: MathNode; args: MathNode[] };
      if (fnNode.fn.type !== "SymbolNode") {
        return notAllowed(ctx, "Only the named functions can be called in a formula.", undefined);
      }
      const name = (fnNode.fn as unknown as { name: string }).name;
      if (!isFormulaFunction(name)) {
        const pos = identifierPosition(t, name, true);
        return addError(ctx, {
          code: "unknown-function",
          name,
          message: `"${name}" is not a function formulas can use. Available: ${FUNCTION_NAMES}.`,
          ...(pos === undefined ? {} : { position: pos }),
        });
      }
      const spec = FORMULA_FUNCTIONS[name];
      const n = fnNode.args.length;
      if (n < spec.minArgs || n > spec.maxArgs) {
        const pos = identifierPosition(t, name, true);
        const expected = spec.maxArgs === Infinity ? `at least ${spec.minArgs} arguments` : spec.minArgs === 1 ? "exactly one argument" : `${spec.minArgs} arguments`;
        const hint = name === "log" ? " log is the natural logarithm; for base b write log(x) / log(b)." : "";
        return addError(ctx, {
          code: "wrong-arity",
          name,
          message: `${name} takes ${expected}, not ${n}.${hint}`,
          ...(pos === undefined ? {} : { position: pos }),
        });
      }
      const args = fnNode.args.map((a) => fromMathNode(a, ctx));
      if (args.some((x) => x === null)) return null;
      return { k: "call", fn: name, args: args as Expr[] };
    }
    case "AssignmentNode":
      return notAllowed(ctx, "Assignments (=) are not allowed: a formula computes a rate from vital rates, it cannot define names. Define vital rates in the Rates table.", firstTokenPosition(t, (x) => x.text === "="));
    case "FunctionAssignmentNode":
      return notAllowed(ctx, "Defining functions is not allowed in a formula.", firstTokenPosition(t, (x) => x.text === "="));
    case "AccessorNode":
    case "IndexNode":
      return notAllowed(ctx, "Property access and indexing (. and [ ]) are not allowed in a formula.", firstTokenPosition(t, (x) => x.text === "." || x.text === "["));
    case "ArrayNode":
      return notAllowed(ctx, "Lists and matrices ([ ]) are not allowed in a formula; a formula gives one number.", firstTokenPosition(t, (x) => x.text === "["));
    case "ObjectNode":
      return notAllowed(ctx, "Objects ({ }) are not allowed in a formula.", firstTokenPosition(t, (x) => x.text === "{"));
    case "RangeNode":
      return notAllowed(ctx, "Ranges (:) are not allowed in a formula.", firstTokenPosition(t, (x) => x.text === ":"));
    case "ConditionalNode":
      return notAllowed(ctx, "Conditions (? :) are not allowed in a formula; min and max cover most thresholds.", firstTokenPosition(t, (x) => x.text === "?"));
    case "RelationalNode":
      return notAllowed(ctx, "Comparisons are not allowed in a formula.", firstTokenPosition(t, (x) => ["<", ">", "<=", ">=", "==", "!="].includes(x.text)));
    case "BlockNode":
      return notAllowed(ctx, "A formula is a single expression: remove the ; or line break.", firstTokenPosition(t, (x) => x.text === ";" || x.text === "\n" || x.text === "\r"));
    default:
      return notAllowed(ctx, `This kind of expression (${node.type}) is not allowed in a formula.`, undefined);
  }
}

function nestingDepth(tokens: readonly Token[]): { depth: number; position: number } {
  let depth = 0;
  let max = 0;
  let position = 0;
  for (const t of tokens) {
    if (t.text === "(" || t.text === "[" || t.text === "{") {
      depth++;
      if (depth > max) {
        max = depth;
        position = t.start;
      }
    } else if (t.text === ")" || t.text === "]" || t.text === "}") depth--;
  }
  return { depth: max, position };
}

function parseUncached(text: string): ParseResult {
  const fail = (error: Omit<FormulaError, "formula">): ParseResult => ({ ok: false, errors: [{ formula: text, ...error }] });
  if (text.trim() === "") return fail({ code: "empty", message: "The formula is empty: enter a number or an expression of vital rates." });
  if (text.length > MAX_FORMULA_LENGTH) {
    return fail({ code: "too-long", message: `The formula is ${text.length} characters long; the limit is ${MAX_FORMULA_LENGTH}.` });
  }
  const tokens = tokenize(text);
  // Characters mathjs would read silently in a way nobody means here:
  // "#" starts a comment (dropping the rest), "%" is a percentage or modulo.
  for (const tok of tokens) {
    if (tok.text === "#") return fail({ code: "not-allowed", position: tok.start, message: '"#" is not allowed in a formula (it would hide the rest of the text). Put remarks in the notes.' });
    if (tok.text === "%") return fail({ code: "not-allowed", position: tok.start, message: '"%" is not allowed in a formula; write a proportion, e.g. 0.25 instead of 25%.' });
  }
  const nesting = nestingDepth(tokens);
  if (nesting.depth > MAX_FORMULA_DEPTH) {
    return fail({ code: "too-deep", position: nesting.position, message: `The formula nests parentheses ${nesting.depth} deep; the limit is ${MAX_FORMULA_DEPTH}.` });
  }
  let node: MathNode;
  try {
    node = mathParse(text);
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    // mathjs reports a 1-based column as err.char and in the message as "(char N)".
    const rawChar = (err as { char?: unknown }).char ?? /\(char (\d+)\)/.exec(message)?.[1];
    const oneBased = typeof rawChar === "number" ? rawChar : typeof rawChar === "string" ? Number(rawChar) : NaN;
    const position = Number.isInteger(oneBased) ? Math.min(Math.max(oneBased - 1, 0), text.length) : undefined;
    const reason = message.replace(/\s*\(char \d+\)\s*$/, "");
    return fail({
      code: "syntax",
      message: `Syntax error${position === undefined ? "" : ` at character ${position + 1}`}: ${reason}.`,
      ...(position === undefined ? {} : { position }),
    });
  }
  const ctx: ParseContext = { text, tokens, errors: [], symbols: [] };
  const expr = fromMathNode(node, ctx);
  if (expr === null || ctx.errors.length > 0) {
    return { ok: false, errors: ctx.errors.length > 0 ? ctx.errors : [{ formula: text, code: "not-allowed", message: "The formula is not allowed." }] };
  }
  return { ok: true, expr, symbols: ctx.symbols };
}

/** Parses and checks a formula's structure (not its names); cached by text. */
function parseFormula(text: string): ParseResult {
  let result = parseCache.get(text);
  if (result === undefined) {
    result = parseUncached(text);
    parseCache.set(text, result);
  }
  return result;
}

// -------------------------------------------------------------- evaluation

/** Vital-rate values by slot; the slots are fixed when a formula is bound. */
export type SlotValues = Float64Array | readonly number[];
export type BoundFormula = (x: SlotValues) => number;

function evaluationError(code: FormulaErrorCode, formula: string, message: string): FormulaEvaluationError {
  return new FormulaEvaluationError({ code, formula, message });
}

function fmt(v: number): string {
  return Number.isFinite(v) ? String(Number(v.toPrecision(6))) : String(v);
}

function invlogit(x: number): number {
  if (x >= 0) return 1 / (1 + Math.exp(-x));
  const t = Math.exp(x);
  return t / (1 + t);
}

/**
 * Compiles a tree into a closure over slot-indexed values. `slot` maps each
 * rate name to its index. Every operation checks its result, so the first
 * non-finite value is reported where it arises.
 */
export function bindExpr(expr: Expr, slot: (name: string) => number, formula: string): BoundFormula {
  const nonFinite = (e: Expr, r: number, detail?: string): never => {
    throw evaluationError("not-finite", formula, `"${printExpr(e)}" has no finite value${detail === undefined ? "" : ` (${detail})`}; got ${fmt(r)} in ${formula}.`);
  };
  const build = (e: Expr): BoundFormula => {
    switch (e.k) {
      case "num": {
        const v = e.v;
        return () => v;
      }
      case "rate": {
        const i = slot(e.name);
        return (x) => x[i] as number;
      }
      case "neg": {
        const a = build(e.a);
        return (x) => -a(x);
      }
      case "sign": {
        const a = build(e.a);
        return (x) => Math.sign(a(x));
      }
      case "add":
      case "sub":
      case "mul": {
        const a = build(e.a);
        const b = build(e.b);
        const f = e.k === "add" ? (x: SlotValues) => a(x) + b(x) : e.k === "sub" ? (x: SlotValues) => a(x) - b(x) : (x: SlotValues) => a(x) * b(x);
        return (x) => {
          const r = f(x);
          return r - r === 0 ? r : nonFinite(e, r);
        };
      }
      case "div": {
        const a = build(e.a);
        const b = build(e.b);
        return (x) => {
          const d = b(x);
          if (d === 0) {
            throw evaluationError("division-by-zero", formula, `Division by zero: "${printExpr(e.b)}" is 0 in ${formula}.`);
          }
          const r = a(x) / d;
          return r - r === 0 ? r : nonFinite(e, r);
        };
      }
      case "pow": {
        const a = build(e.a);
        const b = build(e.b);
        return (x) => {
          const base = a(x);
          const exponent = b(x);
          const r = Math.pow(base, exponent);
          if (r - r === 0) return r;
          if (base === 0 && exponent < 0) {
            throw evaluationError("division-by-zero", formula, `Division by zero: 0 raised to the negative power ${fmt(exponent)} in "${printExpr(e)}" (${formula}).`);
          }
          return nonFinite(e, r, base < 0 ? "a negative number raised to a fractional power" : undefined);
        };
      }
      case "call": {
        const args = e.args.map(build);
        const [a0] = args as [BoundFormula, ...BoundFormula[]];
        const domain = (what: string, v: number): never => {
          throw evaluationError("not-finite", formula, `${e.fn} needs ${what}; "${printExpr(e.args[0]!)}" is ${fmt(v)} in ${formula}.`);
        };
        const checked = (f: (v: number) => number) => (x: SlotValues) => {
          const r = f(a0(x));
          return r - r === 0 ? r : nonFinite(e, r);
        };
        switch (e.fn) {
          case "exp":
            return checked(Math.exp);
          case "log":
            return checked((v) => (v > 0 ? Math.log(v) : domain("a positive argument", v)));
          case "sqrt":
            return checked((v) => (v >= 0 ? Math.sqrt(v) : domain("a non-negative argument", v)));
          case "abs":
            return (x) => Math.abs(a0(x));
          case "logit":
            return checked((v) => (v > 0 && v < 1 ? Math.log(v) - Math.log1p(-v) : domain("an argument strictly between 0 and 1", v)));
          case "invlogit":
            return (x) => invlogit(a0(x));
          case "min":
          case "max": {
            const pick = e.fn === "min" ? Math.min : Math.max;
            return (x) => {
              let r = a0(x);
              for (let i = 1; i < args.length; i++) r = pick(r, args[i]!(x));
              return r;
            };
          }
        }
      }
    }
  };
  return build(expr);
}

// ------------------------------------------------------------ public API

/** A checked formula, ready to evaluate by vital-rate name. */
export interface CompiledFormula {
  /** The formula text (for a derivative: the derivative's text). */
  readonly formula: string;
  /** The vital rates the formula uses, in order of first appearance. */
  readonly rateNames: readonly string[];
  /** Our expression tree (for binding to slots in hot loops). */
  readonly expr: Expr;
  /** Value at the given vital-rate values (by name). Throws FormulaEvaluationError. */
  evaluate(values: Readonly<Record<string, number>>): number;
}

export type FormulaCheck = { readonly ok: true; readonly compiled: CompiledFormula } | { readonly ok: false; readonly errors: readonly FormulaError[] };

function collectRates(e: Expr, out: string[]): string[] {
  switch (e.k) {
    case "num":
      break;
    case "rate":
      if (!out.includes(e.name)) out.push(e.name);
      break;
    case "neg":
    case "sign":
      collectRates(e.a, out);
      break;
    case "call":
      for (const a of e.args) collectRates(a, out);
      break;
    default:
      collectRates(e.a, out);
      collectRates(e.b, out);
  }
  return out;
}

function makeCompiled(formula: string, expr: Expr, rateNames: readonly string[]): CompiledFormula {
  const index = new Map(rateNames.map((n, i) => [n, i]));
  const bound = bindExpr(expr, (n) => index.get(n)!, formula);
  const x = new Float64Array(rateNames.length);
  return {
    formula,
    rateNames,
    expr,
    evaluate(values) {
      rateNames.forEach((n, i) => {
        const v = Object.hasOwn(values, n) ? values[n] : undefined;
        if (typeof v !== "number" || !Number.isFinite(v)) {
          throw new FormulaEvaluationError({
            code: "missing-value",
            formula,
            name: n,
            message: v === undefined ? `No value given for the vital rate ${n}.` : `The vital rate ${n} must be a finite number; got ${String(v)}.`,
          });
        }
        x[i] = v;
      });
      return bound(x);
    },
  };
}

/**
 * Checks a formula against the language and the known vital-rate names.
 * Returns every problem found, each with a position where one is known.
 */
export function checkFormula(formula: string, rateNames: Iterable<string>): FormulaCheck {
  const parsed = parseFormula(formula);
  const known = rateNames instanceof Set ? (rateNames as ReadonlySet<string>) : new Set(rateNames);
  if (!parsed.ok) {
    // A call of a vital rate is most likely a missing "*".
    const errors = parsed.errors.map((e) =>
      e.code === "unknown-function" && e.name !== undefined && known.has(e.name)
        ? { ...e, message: `${e.name} is a vital rate, not a function: write ${e.name} * (…) to multiply.` }
        : e,
    );
    return { ok: false, errors };
  }
  const unknown = parsed.symbols.filter((s) => !known.has(s));
  if (unknown.length > 0) {
    const tokens = tokenize(formula);
    return {
      ok: false,
      errors: unknown.map((name) => {
        const position = identifierPosition(tokens, name, false);
        return {
          code: "unknown-rate" as const,
          formula,
          name,
          message: `Unknown vital rate "${name}"${position === undefined ? "" : ` at character ${position + 1}`}: add it in the Rates table or correct the name.`,
          ...(position === undefined ? {} : { position }),
        };
      }),
    };
  }
  return { ok: true, compiled: makeCompiled(formula, parsed.expr, parsed.symbols) };
}

/**
 * Compiles a formula; when `rateNames` is given, every name in the formula
 * must be one of them. Throws FormulaCompileError.
 */
export function compileFormula(formula: string, rateNames?: Iterable<string>): CompiledFormula {
  const parsed = parseFormula(formula);
  const check = checkFormula(formula, rateNames ?? (parsed.ok ? parsed.symbols : []));
  if (!check.ok) throw new FormulaCompileError(check.errors);
  return check.compiled;
}

// ------------------------------------------------------------- derivatives

const PLACEHOLDER_RATE = "_r";
const PLACEHOLDER_SIGN = "_s";

const num = (v: number): MathNode => new ConstantNode(v) as unknown as MathNode;
const sym = (name: string): MathNode => new SymbolNode(name) as unknown as MathNode;
const call = (name: string, args: MathNode[]): MathNode => new FunctionNode(new SymbolNode(name), args) as unknown as MathNode;
const op = (symbol: string, fn: string, args: MathNode[]): MathNode =>
  // The constructor's types tie op to fn; both are correct here.
  new (OperatorNode as unknown as new (op: string, fn: string, args: MathNode[]) => MathNode)(symbol, fn, args);

/**
 * Our tree as a mathjs tree that mathjs can differentiate, with the same
 * value at every point:
 * - rate names become placeholders `_r<k>`, so no name means anything to mathjs;
 * - logit(p) = log(p / (1 − p)); invlogit(x) = 1 / (1 + exp(−x));
 * - abs(u) = u · S with S = sign(u) a placeholder `_s<j>` held constant by
 *   the differentiation and evaluated at the point; min and max reduce to
 *   abs pairwise: min(a, b) = (a + b − |a − b|) / 2, max with +.
 *   At a tie (u = 0) S = 0, giving the mean of the one-sided derivatives —
 *   the value a central finite difference converges to.
 */
function toMathNode(e: Expr, rates: string[], signs: Expr[]): MathNode {
  const rec = (x: Expr) => toMathNode(x, rates, signs);
  const signOf = (arg: Expr): MathNode => {
    signs.push(arg);
    return sym(`${PLACEHOLDER_SIGN}${signs.length - 1}`);
  };
  switch (e.k) {
    case "num":
      return num(e.v);
    case "rate": {
      let i = rates.indexOf(e.name);
      if (i < 0) i = rates.push(e.name) - 1;
      return sym(`${PLACEHOLDER_RATE}${i}`);
    }
    case "neg":
      return op("-", "unaryMinus", [rec(e.a)]);
    case "sign":
      throw new Error("sign() only appears in derivatives");
    case "add":
      return op("+", "add", [rec(e.a), rec(e.b)]);
    case "sub":
      return op("-", "subtract", [rec(e.a), rec(e.b)]);
    case "mul":
      return op("*", "multiply", [rec(e.a), rec(e.b)]);
    case "div":
      return op("/", "divide", [rec(e.a), rec(e.b)]);
    case "pow":
      return op("^", "pow", [rec(e.a), rec(e.b)]);
    case "call": {
      const [first] = e.args as [Expr, ...Expr[]];
      switch (e.fn) {
        case "exp":
        case "log":
        case "sqrt":
          return call(e.fn, [rec(first)]);
        case "logit": {
          const p = rec(first);
          return call("log", [op("/", "divide", [p, op("-", "subtract", [num(1), rec(first)])])]);
        }
        case "invlogit":
          return op("/", "divide", [num(1), op("+", "add", [num(1), call("exp", [op("-", "unaryMinus", [rec(first)])])])]);
        case "abs":
          return op("*", "multiply", [rec(first), signOf(first)]);
        case "min":
        case "max": {
          let accExpr: Expr = first;
          let acc = rec(first);
          for (let i = 1; i < e.args.length; i++) {
            const b = e.args[i]!;
            const diff = op("-", "subtract", [acc, rec(b)]);
            const absDiff = op("*", "multiply", [diff, signOf({ k: "sub", a: accExpr, b })]);
            const sum = op("+", "add", [acc, rec(b)]);
            acc = op("/", "divide", [op(e.fn === "min" ? "-" : "+", e.fn === "min" ? "subtract" : "add", [sum, absDiff]), num(2)]);
            accExpr = { k: "call", fn: e.fn, args: e.args.slice(0, i + 1) };
          }
          return acc;
        }
      }
    }
  }
}

// Smart constructors that fold the trivial terms differentiation leaves
// behind (x·1, x·0, x + 0, constant arithmetic).
const isNum = (e: Expr, v?: number): e is { k: "num"; v: number } => e.k === "num" && (v === undefined || e.v === v);
function mk(k: "add" | "sub" | "mul" | "div" | "pow", a: Expr, b: Expr): Expr {
  if (isNum(a) && isNum(b)) {
    const r = k === "add" ? a.v + b.v : k === "sub" ? a.v - b.v : k === "mul" ? a.v * b.v : k === "div" ? a.v / b.v : Math.pow(a.v, b.v);
    if (Number.isFinite(r) && !Object.is(r, -0)) return { k: "num", v: r };
  }
  switch (k) {
    case "add":
      if (isNum(a, 0)) return b;
      if (isNum(b, 0)) return a;
      if (b.k === "neg") return mk("sub", a, b.a);
      break;
    case "sub":
      if (isNum(b, 0)) return a;
      if (isNum(a, 0)) return neg(b);
      if (b.k === "neg") return mk("add", a, b.a);
      break;
    case "mul":
      if (isNum(a, 0) || isNum(b, 0)) return { k: "num", v: 0 };
      if (isNum(a, 1)) return b;
      if (isNum(b, 1)) return a;
      if (isNum(a, -1)) return neg(b);
      if (isNum(b, -1)) return neg(a);
      if (b.k === "div" && isNum(b.a, 1)) return mk("div", a, b.b);
      if (a.k === "neg") return neg(mk("mul", a.a, b));
      break;
    case "div":
      if (isNum(a, 0) && !isNum(b, 0)) return { k: "num", v: 0 };
      if (isNum(b, 1)) return a;
      if (a.k === "neg") return neg(mk("div", a.a, b));
      break;
    case "pow":
      if (isNum(b, 1)) return a;
      if (isNum(b, 0)) return { k: "num", v: 1 };
      break;
  }
  return { k, a, b };
}
function neg(a: Expr): Expr {
  if (a.k === "num") return { k: "num", v: a.v === 0 ? 0 : -a.v };
  if (a.k === "neg") return a.a;
  return { k: "neg", a };
}

const MATH_TO_KIND: Readonly<Record<string, "add" | "sub" | "mul" | "div" | "pow">> = {
  add: "add",
  subtract: "sub",
  multiply: "mul",
  divide: "div",
  pow: "pow",
};

/** mathjs's derivative back into our tree, placeholders resolved. */
function fromDerivativeNode(node: MathNode, rates: readonly string[], signs: readonly Expr[]): Expr {
  const rec = (n: MathNode) => fromDerivativeNode(n, rates, signs);
  switch (node.type) {
    case "ConstantNode": {
      const value = (node as unknown as { value: unknown }).value;
      if (typeof value === "number") return { k: "num", v: value };
      break;
    }
    case "SymbolNode": {
      const name = (node as unknown as { name: string }).name;
      const m = /^_([rs])(\d+)$/.exec(name);
      if (m?.[1] === "r") {
        const rate = rates[Number(m[2])];
        if (rate !== undefined) return { k: "rate", name: rate };
      } else if (m?.[1] === "s") {
        const arg = signs[Number(m[2])];
        if (arg !== undefined) return { k: "sign", a: arg };
      }
      break;
    }
    case "ParenthesisNode":
      return rec((node as unknown as { content: MathNode }).content);
    case "OperatorNode": {
      const o = node as unknown as { fn: string; args: MathNode[] };
      const [a, b] = o.args;
      if (o.fn === "unaryMinus" && a) return neg(rec(a));
      if (o.fn === "unaryPlus" && a) return rec(a);
      const kind = MATH_TO_KIND[o.fn];
      if (kind && a && b) return mk(kind, rec(a), rec(b));
      break;
    }
    case "FunctionNode": {
      const f = node as unknown as { fn: { name?: string }; args: MathNode[] };
      const name = f.fn.name;
      if ((name === "exp" || name === "log" || name === "sqrt") && f.args.length === 1) {
        const arg = rec(f.args[0]!);
        if (arg.k === "num") {
          const v = name === "exp" ? Math.exp(arg.v) : name === "log" ? Math.log(arg.v) : Math.sqrt(arg.v);
          if (Number.isFinite(v)) return { k: "num", v };
        }
        return { k: "call", fn: name, args: [arg] };
      }
      break;
    }
  }
  // Unreachable for trees built by toMathNode; a loud failure beats a wrong derivative.
  throw new Error(`Unexpected node in a derivative: ${node.toString()}`);
}

function derivativeExpr(formula: string, expr: Expr, rateName: string): Expr {
  const key = `${rateName}\u0000${formula}`;
  const cached = derivativeCache.get(key);
  if (cached !== undefined) return cached;
  const rates: string[] = [];
  const signs: Expr[] = [];
  const prepared = toMathNode(expr, rates, signs);
  const index = rates.indexOf(rateName);
  let result: Expr;
  if (index < 0) result = { k: "num", v: 0 };
  else {
    const d = mathDerivative(prepared, sym(`${PLACEHOLDER_RATE}${index}`) as unknown as string, { simplify: false });
    result = fromDerivativeNode(d, rates, signs);
  }
  derivativeCache.set(key, result);
  return result;
}

/**
 * ∂(formula)/∂(rateName) as a compiled formula over the same vital rates.
 * Its text may use sign(x) (the sign of x), which only derivatives contain.
 * Throws FormulaCompileError when the formula itself is not valid.
 */
export function derivative(formula: string, rateName: string): CompiledFormula {
  const parsed = parseFormula(formula);
  if (!parsed.ok) throw new FormulaCompileError(parsed.errors);
  const d = derivativeExpr(formula, parsed.expr, rateName);
  const text = printExpr(d);
  return makeCompiled(text, d, collectRates(d, []));
}

/** The derivative tree only, for binding to slots (see matrices.ts). */
export function derivativeTree(formula: string, rateName: string): Expr {
  const parsed = parseFormula(formula);
  if (!parsed.ok) throw new FormulaCompileError(parsed.errors);
  return derivativeExpr(formula, parsed.expr, rateName);
}

/** The vital-rate names a formula uses (empty when it does not parse). */
export function formulaRateNames(formula: string): readonly string[] {
  const parsed = parseFormula(formula);
  return parsed.ok ? parsed.symbols : [];
}
