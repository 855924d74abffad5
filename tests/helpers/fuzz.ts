// Hostile inputs for the API fuzzer: random JSON, and valid bodies with a few
// parts mutated (replaced, removed, retyped, duplicated, extra keys added).
import fc from "fast-check";

type Json = null | boolean | number | string | Json[] | { [key: string]: Json };

/** Strings that have broken servers before: NUL bytes, lone surrogates, markup, SQL, paths, very long ones. */
export const hostileString: fc.Arbitrary<string> = fc.oneof(
  { weight: 3, arbitrary: fc.string() },
  { weight: 2, arbitrary: fc.string({ unit: "binary", maxLength: 40 }) },
  {
    weight: 4,
    arbitrary: fc.constantFrom(
      "",
      " ",
      "\u0000",
      "a\u0000b",
      "\uD800",
      "x\uDFFFy",
      "λ 𝛌 ✓",
      "<script>alert(1)</script>",
      "<img src=x onerror=alert(1)>",
      "' OR 1=1 --",
      "\"; DROP TABLE users; --",
      "../../etc/passwd",
      "%00",
      "%E0%A4%A",
      "__proto__",
      "constructor",
      "NaN",
      "Infinity",
      "-1",
      "1e309",
      "null",
      "00000000-0000-4000-8000-000000000000",
      "s_a * (1 - ",
      "exp(exp(exp(exp(1000))))",
      "x".repeat(10_000),
      "é".repeat(5_000),
      "a@b",
      "someone@example.org",
    ),
  },
);

/** Numbers at the edges: JSON cannot carry NaN or ±Infinity, so those arrive as null. */
export const hostileNumber: fc.Arbitrary<number> = fc.oneof(
  fc.integer(),
  fc.double(),
  fc.constantFrom(0, -0, -1, 1, 0.5, 1e308, -1e308, 5e-324, 2 ** 53 + 1, 1e21, 2 ** 31, -(2 ** 31) - 1, 1e-300),
);

export const hostileValue: fc.Arbitrary<Json> = fc.oneof(
  { weight: 3, arbitrary: hostileString },
  { weight: 3, arbitrary: hostileNumber as fc.Arbitrary<Json> },
  { weight: 1, arbitrary: fc.boolean() },
  { weight: 1, arbitrary: fc.constant(null) },
  { weight: 2, arbitrary: fc.jsonValue({ maxDepth: 3 }) as fc.Arbitrary<Json> },
  { weight: 1, arbitrary: fc.array(hostileNumber, { maxLength: 8 }) as fc.Arbitrary<Json> },
  { weight: 1, arbitrary: fc.dictionary(hostileString, hostileString, { maxKeys: 4 }) as fc.Arbitrary<Json> },
);

const OPS = ["replace", "delete", "addKey", "wrap", "duplicate", "empty", "stringify"] as const;
type Mutation = { pick: number; op: (typeof OPS)[number]; value: Json; key: string };

const mutationArb: fc.Arbitrary<Mutation> = fc.record({
  pick: fc.nat(),
  op: fc.constantFrom(...OPS),
  value: hostileValue,
  key: fc.oneof(hostileString, fc.constantFrom("__proto__", "constructor", "prototype", "id", "version", "extra")),
});

type Slot = { parent: Json[] | { [k: string]: Json } | null; key: string | number; value: Json };

function slots(value: Json, parent: Slot["parent"] = null, key: string | number = "", out: Slot[] = []): Slot[] {
  out.push({ parent, key, value });
  if (Array.isArray(value)) value.forEach((v, i) => slots(v, value, i, out));
  else if (value && typeof value === "object") for (const [k, v] of Object.entries(value)) slots(v, value, k, out);
  return out;
}

/** Applies one mutation to a deep copy's slot; the root (parent null) is replaced as a whole. */
function applyMutation(root: Json, m: Mutation): Json {
  const all = slots(root);
  const slot = all[m.pick % all.length]!;
  const set = (v: Json | undefined) => {
    if (!slot.parent) return;
    if (Array.isArray(slot.parent)) {
      if (v === undefined) slot.parent.splice(slot.key as number, 1);
      else slot.parent[slot.key as number] = v;
    } else if (v === undefined) delete slot.parent[slot.key as string];
    else Object.defineProperty(slot.parent, slot.key as string, { value: v, enumerable: true, writable: true, configurable: true });
  };
  const v = slot.value;
  let next: Json | undefined;
  switch (m.op) {
    case "replace": next = m.value; break;
    case "delete": next = undefined; break;
    case "addKey":
      if (v && typeof v === "object" && !Array.isArray(v)) {
        Object.defineProperty(v, m.key, { value: m.value, enumerable: true, writable: true, configurable: true });
        return root;
      }
      next = Array.isArray(v) ? [...v, m.value] : { [m.key]: m.value };
      break;
    case "wrap": next = [v]; break;
    case "duplicate": next = Array.isArray(v) ? [...v, ...v] : typeof v === "string" ? v.repeat(50) : typeof v === "number" ? v * 1e6 : v; break;
    case "empty": next = Array.isArray(v) ? [] : v && typeof v === "object" ? {} : typeof v === "string" ? "" : 0; break;
    case "stringify": next = JSON.stringify(v) ?? null; break;
  }
  if (!slot.parent) return next === undefined ? null : next;
  set(next);
  return root;
}

/** A seed body with one to three mutations. */
export function mutatedBody(seed: unknown): fc.Arbitrary<Json> {
  return fc.array(mutationArb, { minLength: 1, maxLength: 3 }).map((ms) => ms.reduce<Json>((body, m) => applyMutation(body, m), structuredClone(seed) as Json));
}

/** Bodies that are not JSON objects at all, with the content type they claim. */
export const rawBodies: fc.Arbitrary<{ contentType: string; body: string }> = fc.oneof(
  fc.record({ contentType: fc.constant("application/json"), body: fc.constantFrom("{", "{\"a\":", "[1,2", "nul", "\"unterminated", "{\"a\":1}}", "\u0000", "{\"__proto__\":{\"polluted\":1}}", "[".repeat(5_000) + "]".repeat(5_000), "{\"a\":" .repeat(2_000) + "1" + "}".repeat(2_000)) }),
  fc.record({ contentType: fc.constantFrom("text/plain", "application/x-www-form-urlencoded", "multipart/form-data; boundary=x", "application/xml", "application/json; charset=utf-16"), body: fc.constantFrom("a=b&a=c", "name=x", "<x/>", "--x\r\n\r\n--x--", "{}") }),
  fc.record({ contentType: fc.constant("application/json"), body: fc.string({ unit: "binary", maxLength: 200 }) }),
);

/** Hostile path-parameter values (percent-encoded before use). */
export const hostileParam: fc.Arbitrary<string> = fc.oneof(
  fc.uuid(),
  fc.constantFrom("not-a-uuid", "00000000-0000-0000-0000-000000000000", "..", "%", "' OR 1=1", "\u0000", "x".repeat(5_000), "null", "-1", "1e9", "ffffffff-ffff-ffff-ffff-ffffffffffff"),
  hostileString.filter((s) => s.length > 0),
);

/** A hostile query string (the routes take none; it must be ignored or refused, never crash). */
export const hostileQuery: fc.Arbitrary<string> = fc.oneof(
  fc.constant(""),
  fc.constantFrom("?a=1&a=2", "?__proto__[x]=1", "?constructor=1", "?limit=-1&offset=1e309", "?%=1", "?" + "a=1&".repeat(2_000)),
  fc.dictionary(fc.string({ maxLength: 8 }), hostileString, { maxKeys: 3 }).map((d) => "?" + new URLSearchParams(d).toString()),
);

/** Values each leaf of a valid body is swept with, by the leaf's type, plus one wrong-typed value in turn. */
const SWEEP_STRINGS: Json[] = ["a\u0000b", "\uD800", "", "x".repeat(100_000)];
const SWEEP_NUMBERS: Json[] = [-1, 1e308, 2 ** 31, 0.5];
const SWEEP_WRONG_TYPE: Json[] = [null, true, [], {}, "1"];

/** A valid body with one leaf replaced: for every leaf, the values known to break servers for its type, and one wrong type. */
export function leafSweep(seed: unknown): Json[] {
  const out: Json[] = [];
  const leaves = slots(structuredClone(seed) as Json);
  for (let i = 1; i < leaves.length; i++) {
    const v = leaves[i]!.value;
    const values = [...(typeof v === "string" ? SWEEP_STRINGS : typeof v === "number" ? SWEEP_NUMBERS : []), SWEEP_WRONG_TYPE[i % SWEEP_WRONG_TYPE.length]!];
    for (const value of values) out.push(applyMutation(structuredClone(seed) as Json, { pick: i, op: "replace", value, key: "" }));
  }
  return out;
}
