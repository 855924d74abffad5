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

// ------------------------------------------------------------ CSV files and multipart forms

/** Cell values that have broken CSV readers: quotes, delimiters and line ends inside a cell, odd numbers, formulas. */
const hostileCell: fc.Arbitrary<string> = fc.oneof(
  { weight: 2, arbitrary: hostileString.map((s) => s.slice(0, 2_000)) },
  {
    weight: 5,
    arbitrary: fc.constantFrom(
      "",
      " ",
      "\"",
      "\"a\"\"b\"",
      "\"unclosed",
      "a,b",
      "a;b",
      "a\tb",
      "a\nb",
      "\r",
      "1,5",
      "1.5",
      "-3",
      "0",
      "1e400",
      "-1e400",
      "NaN",
      "Infinity",
      "12abc",
      " 12 ",
      "١٢٣",
      "2020-13-45",
      "2020-02-30",
      "1999-12-31",
      "0000",
      "99999",
      "2021.5",
      "=1+1",
      "@SUM(A1)",
      "dead",
      "DEAD",
      "J",
      "A",
      "North",
    ),
  },
  { weight: 1, arbitrary: fc.integer({ min: -1_000_000, max: 10_000_000 }).map(String) },
  { weight: 1, arbitrary: fc.double({ noNaN: true }).map(String) },
);

const CSV_OPS = ["cell", "dropLine", "repeatLine", "dropColumn", "addColumn", "swapColumns", "blankLines", "header", "truncate", "appendJunk"] as const;
type CsvMutation = { op: (typeof CSV_OPS)[number]; a: number; b: number; cell: string; times: number };
const csvMutationArb: fc.Arbitrary<CsvMutation> = fc.record({ op: fc.constantFrom(...CSV_OPS), a: fc.nat(), b: fc.nat(), cell: hostileCell, times: fc.integer({ min: 2, max: 3_000 }) });

/** How the mutated table is written out: delimiter, line end, byte-order mark, encoding, a trailing line end. */
const csvLayoutArb = fc.record({
  delimiter: fc.constantFrom(",", ",", ",", ";", "\t", "|", " "),
  lineEnd: fc.constantFrom("\n", "\n", "\r\n", "\r"),
  bom: fc.boolean(),
  encoding: fc.constantFrom("utf8", "utf8", "utf8", "utf8", "utf16le", "latin1"),
  trailing: fc.boolean(),
});

function applyCsvMutation(rows: string[][], m: CsvMutation): string[][] {
  const out = rows.map((r) => [...r]);
  const line = out.length ? m.a % out.length : 0;
  const width = Math.max(1, ...out.map((r) => r.length));
  const col = m.b % width;
  switch (m.op) {
    case "cell":
      if (out[line]) out[line]![col] = m.cell;
      break;
    case "dropLine": out.splice(line, 1); break;
    case "repeatLine": if (out[line]) out.splice(line, 0, ...Array.from({ length: m.times }, () => [...out[line]!])); break;
    case "dropColumn": for (const r of out) r.splice(col, 1); break;
    case "addColumn": out.forEach((r, i) => r.splice(col, 0, i === 0 ? m.cell || "extra" : m.cell)); break;
    case "swapColumns": for (const r of out) [r[col], r[(col + 1) % width]] = [r[(col + 1) % width] ?? "", r[col] ?? ""]; break;
    case "blankLines": out.splice(line, 0, [], [""], []); break;
    case "header": if (out[0]) out[0][col] = m.cell; break;
    case "truncate": return out.slice(0, line);
    case "appendJunk": out.push([m.cell.repeat(Math.min(m.times, 50))]); break;
  }
  return out;
}

/**
 * A valid CSV file with up to four mutations of its table (cells, lines,
 * columns, header), written out with a random delimiter, line end, byte-order
 * mark and encoding; sometimes a file that is not a table at all.
 */
export function mutatedCsv(seed: string): fc.Arbitrary<Buffer> {
  const table = seed.split("\n").map((l) => l.split(","));
  const mutated = fc.tuple(fc.array(csvMutationArb, { minLength: 0, maxLength: 4 }), csvLayoutArb).map(([ms, layout]) => {
    const rows = ms.reduce(applyCsvMutation, table);
    const text = (layout.bom ? "\uFEFF" : "") + rows.map((r) => r.join(layout.delimiter)).join(layout.lineEnd) + (layout.trailing ? layout.lineEnd : "");
    return Buffer.from(text, layout.encoding as BufferEncoding);
  });
  const broken = fc.oneof(
    fc.constant(Buffer.alloc(0)),
    fc.constant(Buffer.from("\n\n\n")),
    fc.constant(Buffer.from(seed.split("\n")[0]!)),
    fc.uint8Array({ maxLength: 2_000 }).map((a) => Buffer.from(a)),
    fc.constant(Buffer.from("%PDF-1.7\n%âãÏÓ\n1 0 obj\n")),
    fc.constant(Buffer.from("a".repeat(300_000))),
    fc.constant(Buffer.from(`${seed}\n"${"x".repeat(50_000)}`)),
  );
  return fc.oneof({ weight: 9, arbitrary: mutated }, { weight: 1, arbitrary: broken });
}

/** One multipart upload: the file (or none) under some field name, and the text fields in order. */
export interface MultipartForm {
  file: Buffer | null;
  fileField: string;
  fileName: string;
  /** A second file part (more files than the route takes). */
  secondFile: boolean;
  fields: readonly [string, string][];
}

/** The text fields of an upload as the client sends them: JSON objects as JSON text, strings as they are. */
export function formFields(value: Json): [string, string][] {
  if (!value || typeof value !== "object" || Array.isArray(value)) return value === null ? [] : [["value", typeof value === "string" ? value : JSON.stringify(value)]];
  return Object.entries(value).flatMap(([k, v]): [string, string][] =>
    // An array of strings at the top becomes the same field repeated, as a browser sends a multi-valued field.
    Array.isArray(v) && v.length > 0 && v.every((x) => typeof x === "string") ? v.map((x) => [k, x] as [string, string]) : [[k, typeof v === "string" ? v : (JSON.stringify(v) ?? "")]],
  );
}

/**
 * Multipart uploads built from a valid file and valid fields: the CSV mutated
 * (mutatedCsv), the fields mutated like JSON bodies (mutatedBody) — or both,
 * or neither — and now and then the form itself broken: no file, another
 * field name, two files, a JSON field that is not JSON, too many fields.
 */
export function mutatedForm(seed: { csv: string; fields: Record<string, unknown> }): fc.Arbitrary<MultipartForm> {
  const valid = formFields(seed.fields as Json);
  const fields: fc.Arbitrary<readonly [string, string][]> = fc.oneof(
    { weight: 5, arbitrary: fc.constant(valid).map((v) => [...v]) },
    { weight: 3, arbitrary: mutatedBody(seed.fields).map(formFields) },
    { weight: 1, arbitrary: fc.tuple(fc.constantFrom(...(valid.length ? valid.map(([k]) => k) : ["options"])), fc.constantFrom("{", "{\"a\":", "[1,", "not json", "", "null", "\u0000")).map(([k, v]) => [...valid.filter(([x]) => x !== k), [k, v] as [string, string]]) },
    { weight: 1, arbitrary: fc.constant([...valid, ...Array.from({ length: 12 }, (_, i) => [`extra${i}`, "x"] as [string, string])]) },
  );
  const file = fc.oneof({ weight: 5, arbitrary: fc.constant(Buffer.from(seed.csv)) }, { weight: 15, arbitrary: mutatedCsv(seed.csv) }, { weight: 1, arbitrary: fc.constant(null) });
  return fc.record({
    file,
    fileField: fc.oneof({ weight: 12, arbitrary: fc.constant("file") }, { weight: 1, arbitrary: fc.constantFrom("upload", "file[]", "FILE", "") }),
    fileName: fc.oneof({ weight: 6, arbitrary: fc.constant("data.csv") }, { weight: 1, arbitrary: hostileString.map((s) => s.slice(0, 300)) }),
    secondFile: fc.oneof({ weight: 15, arbitrary: fc.constant(false) }, { weight: 1, arbitrary: fc.constant(true) }),
    fields,
  });
}

/** The seed form with each field of it swept like a JSON body's leaves (leafSweep), the file unchanged. */
export function formLeafSweep(seed: { csv: string; fields: Record<string, unknown> }): MultipartForm[] {
  return leafSweep(seed.fields).map((f) => ({ file: Buffer.from(seed.csv), fileField: "file", fileName: "data.csv", secondFile: false, fields: formFields(f) }));
}

/** A query string from a (mutated) object: strings as they are, arrays as repeated keys, anything else as JSON. */
export function queryString(value: Json): string {
  if (!value || typeof value !== "object" || Array.isArray(value)) return value === null ? "" : `?q=${encodeURIComponent(typeof value === "string" ? value : JSON.stringify(value))}`;
  const params = new URLSearchParams();
  for (const [k, v] of Object.entries(value)) {
    if (Array.isArray(v)) for (const x of v) params.append(k, typeof x === "string" ? x : JSON.stringify(x));
    else params.append(k, typeof v === "string" ? v : JSON.stringify(v));
  }
  const s = params.toString();
  return s ? `?${s}` : "";
}
