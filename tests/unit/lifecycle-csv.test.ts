import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { matrixToCsv, parseMatrixCsv, type CsvIssue, type MatrixCsvResult } from "../../shared/lifecycle";

function parsed(text: string): Extract<MatrixCsvResult, { ok: true }> {
  const r = parseMatrixCsv(text);
  if (!r.ok) throw new Error(`expected CSV to parse: ${JSON.stringify(r.issues)}`);
  return r;
}

function issues(text: string): CsvIssue[] {
  const r = parseMatrixCsv(text);
  if (r.ok) throw new Error("expected CSV to be rejected");
  return r.issues;
}

const leslie = [
  [0.5, 1.5, 2],
  [0.6, 0, 0],
  [0, 1 / 3, 0],
];

describe("matrixToCsv", () => {
  it("writes a header of stage names, a name column and every digit", () => {
    expect(matrixToCsv(leslie, ["Age 1", "Age 2", "Age 3"])).toBe(",Age 1,Age 2,Age 3\r\nAge 1,0.5,1.5,2\r\nAge 2,0.6,0,0\r\nAge 3,0,0.3333333333333333,0\r\n");
  });

  it("quotes names that need it", () => {
    const csv = matrixToCsv([[1]], ['Seed, "dormant"']);
    expect(csv).toBe(',"Seed, ""dormant"""\r\n"Seed, ""dormant""",1\r\n');
  });

  it("refuses mismatched names, ragged rows and non-finite entries", () => {
    expect(() => matrixToCsv(leslie, ["a"])).toThrow("Give 3 stage names");
    expect(() => matrixToCsv([[1, 2], [3]], ["a", "b"])).toThrow("Row 2 has 1 entries");
    expect(() => matrixToCsv([[Number.NaN]], ["a"])).toThrow("only finite numbers");
  });
});

describe("CSV round trip", () => {
  it("returns the same matrix and names", () => {
    const names = ["Seed", "Juvenile, small", ' Adult "A" ', "Ä-stage"];
    const A = [
      [0, 0, 1e-12, 322.38],
      [0.966, 0.1 + 0.2, 0, 0],
      [0, 1 / 7, 0.5, 0],
      [0, 0, 2 / 3, 1e21],
    ];
    for (const delimiter of [",", ";", "\t"] as const) {
      const r = parsed(matrixToCsv(A, names, delimiter));
      expect(r.matrix).toEqual(A);
      expect(r.stageNames).toEqual(names);
      expect(r.delimiter).toBe(delimiter);
    }
  });

  it("returns any matrix of non-negative numbers exactly", () => {
    const matrices = fc.integer({ min: 1, max: 6 }).chain((n) =>
      fc.array(fc.array(fc.double({ min: 0, max: 1e6, noNaN: true, noDefaultInfinity: true }), { minLength: n, maxLength: n }), { minLength: n, maxLength: n }),
    );
    fc.assert(
      fc.property(matrices, (A) => {
        const names = A.map((_, i) => `S${i + 1}`);
        const r = parsed(matrixToCsv(A, names));
        expect(r.matrix).toEqual(A.map((row) => row.map((v) => (Object.is(v, -0) ? 0 : v))));
      }),
      { seed: 7, numRuns: 100 },
    );
  });
});

describe("parseMatrixCsv", () => {
  it("reads a bare matrix", () => {
    expect(parsed("0,1.5\n0.6,0.2\n")).toMatchObject({ matrix: [[0, 1.5], [0.6, 0.2]], stageNames: null, hasHeader: false, hasNameColumn: false });
  });

  it("reads a header without a name column", () => {
    expect(parsed("J,A\n0,2\n0.5,0.8")).toMatchObject({ stageNames: ["J", "A"], hasHeader: true, hasNameColumn: false, matrix: [[0, 2], [0.5, 0.8]] });
  });

  it("reads a name column without a header", () => {
    expect(parsed("J,0,2\nA,0.5,0.8")).toMatchObject({ stageNames: ["J", "A"], hasHeader: false, hasNameColumn: true });
  });

  it("reads numeric stage names under a header with an empty corner", () => {
    expect(parsed(",1,2\n1,0,2\n2,0.5,0.8")).toMatchObject({ stageNames: ["1", "2"], hasHeader: true, hasNameColumn: true, matrix: [[0, 2], [0.5, 0.8]] });
  });

  it("reads a bad cell in the first row or column as a bad cell, not as a name", () => {
    expect(issues("0,x,2\n1,0,0\n0,1,0")).toEqual([{ line: 1, column: 2, message: '"x" is not a number.' }]);
    expect(issues("0,1,2\nx,0,0\n0,1,0")).toEqual([{ line: 2, column: 1, message: '"x" is not a number.' }]);
  });

  it("reads semicolons with decimal commas, tabs, a BOM, CRLF and blank lines", () => {
    expect(parsed("\uFEFF;J;A\r\nJ;0;2,5\r\nA;0,5;0,8\r\n\r\n").matrix).toEqual([[0, 2.5], [0.5, 0.8]]);
    expect(parsed("\tJ\tA\nJ\t0\t2.5\n\nA\t0,5\t1e-3\n")).toMatchObject({ delimiter: "\t", matrix: [[0, 2.5], [0.5, 0.001]] });
  });

  it("trims spaces around unquoted cells", () => {
    expect(parsed(" , J , A \n J , 0 , 2 \n A , 0.5 , 0.8 ").stageNames).toEqual(["J", "A"]);
  });

  it("reports a ragged row with its line", () => {
    expect(issues(",J,A\nJ,0,2\n\nA,0.5\n")).toEqual([{ line: 4, message: "Line 4 has 2 cells; line 2 has 3. Every row needs the same number of cells." }]);
  });

  it("reports each bad cell with its line and column", () => {
    expect(issues(",J,A\nJ,0,two\nA,,-1\n")).toEqual([
      { line: 2, column: 3, message: '"two" is not a number.' },
      { line: 3, column: 2, message: "Empty cell: every matrix entry needs a number (write 0 for no transition)." },
      { line: 3, column: 3, message: "-1 is negative; matrix entries are rates ≥ 0." },
    ]);
  });

  it("takes a decimal comma only when the delimiter is not a comma", () => {
    expect(parsed("0;1,5\n1;0").matrix).toEqual([[0, 1.5], [1, 0]]);
    expect(issues('0,"1,5",2\n1,0,0\n0,1,0')).toEqual([{ line: 1, column: 2, message: '"1,5" is not a number.' }]);
  });

  it("refuses a matrix that is not square", () => {
    expect(issues("0,1,2\n3,4,5\n")[0]!.message).toBe("The matrix has 2 rows and 3 columns; a projection matrix is square.");
  });

  it("refuses row names that differ from the header", () => {
    expect(issues(",J,A\nA,0,2\nJ,0.5,0.8")).toEqual([
      { line: 2, column: 1, message: 'Row 1 is named "A" but column 1 is "J"; rows and columns must list the stages in the same order.' },
    ]);
  });

  it("refuses a header of the wrong length", () => {
    expect(issues(",J,A,X\nJ,0,2\nA,0.5,0.8")[0]).toMatchObject({ line: 1 });
  });

  it("refuses an unclosed quote, an empty file and a header alone", () => {
    expect(issues(',"J,A\nJ,0,2')[0]).toMatchObject({ line: 1, column: 2, message: 'A quoted cell is never closed (missing ").' });
    expect(issues("")[0]!.message).toContain("The file is empty");
    expect(issues("\n\n")[0]!.message).toContain("The file is empty");
    expect(issues(",J,A\n")[0]!.message).toBe("The file has a header row but no matrix rows.");
  });

  it("honours an explicit delimiter", () => {
    expect(parseMatrixCsv("0;1\n2;3", { delimiter: "," }).ok).toBe(false);
    expect(parseMatrixCsv("0;1\n2;3", { delimiter: ";" }).ok).toBe(true);
  });
});
