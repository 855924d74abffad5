import { describe, expect, it } from "vitest";
import { LifeCycleSchema, parseMatrixCsv, upgradeLifeCycle, type LifeCycle } from "../../shared/lifecycle";
import { analyzeLifeCycle } from "../../server/services/analysis";
import { escapeCsvCell, fileStem, lifeCycleJson, matrixCsv, resultsCsv, toCsv } from "../../src/lib/csv-export";

function lifeCycle(overrides: Partial<LifeCycle> = {}): LifeCycle {
  return LifeCycleSchema.parse({
    stagewright: 2,
    name: "=cmd|' /C calc'!A0",
    census: "pre-breeding",
    timeStepUnit: "year",
    stages: [
      { id: "st_j", name: "=HYPERLINK(\"http://x\")", position: { x: 0, y: 0 } },
      { id: "st_a", name: "Adult, breeding", position: { x: 200, y: 0 } },
    ],
    rates: [
      { id: "vr_sj", name: "s_j", value: 0.4, se: 0.05, source: "@field notes" },
      { id: "vr_sa", name: "s_a", value: 0.8 },
      { id: "vr_m", name: "m", value: 1.5, unit: "female offspring per female" },
    ],
    transitions: [
      { id: "tr_1", from: "st_j", to: "st_a", kind: "growth", rate: "s_j" },
      { id: "tr_2", from: "st_a", to: "st_a", kind: "stasis", rate: "s_a" },
      { id: "tr_3", from: "st_a", to: "st_j", kind: "reproduction", rate: "s_j * m" },
    ],
    ...overrides,
  });
}

/** A small RFC 4180 reader, enough to read back what toCsv writes. */
function readCsv(text: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let cell = "";
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i]!;
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') {
        cell += '"';
        i++;
      } else if (ch === '"') quoted = false;
      else cell += ch;
    } else if (ch === '"') quoted = true;
    else if (ch === ",") {
      row.push(cell);
      cell = "";
    } else if (ch === "\r" && text[i + 1] === "\n") {
      row.push(cell);
      rows.push(row);
      row = [];
      cell = "";
      i++;
    } else cell += ch;
  }
  return rows;
}

describe("escapeCsvCell", () => {
  it.each([
    ["=SUM(A1:A3)", "'=SUM(A1:A3)"],
    ["+1+1", "'+1+1"],
    ["-2+3", "'-2+3"],
    ["@SUM(1)", "'@SUM(1)"],
    ["\t=1", "'\t=1"],
    ["\r=1", "\"'\r=1\""],
  ])("prefixes text that a spreadsheet would run: %j", (input, expected) => {
    expect(escapeCsvCell(input)).toBe(expected);
  });

  it("leaves ordinary text alone and quotes commas, quotes and line breaks", () => {
    expect(escapeCsvCell("Adult")).toBe("Adult");
    expect(escapeCsvCell("a=b")).toBe("a=b");
    expect(escapeCsvCell("Adult, breeding")).toBe('"Adult, breeding"');
    expect(escapeCsvCell('say "hi"')).toBe('"say ""hi"""');
    expect(escapeCsvCell("two\nlines")).toBe('"two\nlines"');
    expect(escapeCsvCell(" padded")).toBe('" padded"');
  });

  it("writes numbers as numbers, negative ones too", () => {
    expect(escapeCsvCell(-0.5)).toBe("-0.5");
    expect(escapeCsvCell(1e-20)).toBe("1e-20");
    expect(escapeCsvCell(0.1 + 0.2)).toBe("0.30000000000000004");
    expect(escapeCsvCell(-0)).toBe("0");
    expect(escapeCsvCell(NaN)).toBe("");
    expect(escapeCsvCell(null)).toBe("");
  });

  it("round-trips through a CSV reader", () => {
    const rows = [["=a", "b,c", 'd"e', -1.25, null, "-x"]];
    expect(readCsv(toCsv(rows))).toEqual([["'=a", "b,c", 'd"e', "-1.25", "", "'-x"]]);
  });
});

describe("matrix and results CSV", () => {
  it("writes the matrix with escaped stage names, readable by the matrix importer", () => {
    const csv = matrixCsv(
      [
        [0, 0.6],
        [0.4, 0.8],
      ],
      ["=HYPERLINK(1)", "Adult"],
    );
    expect(csv.split("\r\n")[0]).toBe(",'=HYPERLINK(1),Adult");
    const back = parseMatrixCsv(csv);
    expect(back.ok && back.matrix).toEqual([
      [0, 0.6],
      [0.4, 0.8],
    ]);
  });

  it("writes λ, w, v, S and E with stage names, text escaped and numbers exact", () => {
    const doc = lifeCycle();
    const analysis = analyzeLifeCycle(doc);
    const rows = readCsv(resultsCsv(doc, analysis));
    expect(rows[0]).toEqual(["Stagewright results", "'=cmd|' /C calc'!A0"]);
    const lambdaRow = rows.find((r) => r[0]?.startsWith("lambda"))!;
    expect(Number(lambdaRow[1])).toBe(analysis.lambda);
    const stageHeader = rows.findIndex((r) => r[0] === "Stage");
    expect(rows[stageHeader]![2]).toBe('Reproductive value v (scaled so that v = 1 for =HYPERLINK("http://x"))');
    expect(rows[stageHeader + 1]!.slice(0, 3)).toEqual(["'=HYPERLINK(\"http://x\")", String(analysis.stableStage![0]), "1"]);
    expect(rows[stageHeader + 2]![0]).toBe("Adult, breeding");
    const sHeader = rows.findIndex((r) => r[0]?.startsWith("Sensitivity S"));
    expect(rows[sHeader + 1]).toEqual(["to \\ from", "'=HYPERLINK(\"http://x\")", "Adult, breeding"]);
    expect(rows[sHeader + 2]!.slice(1).map(Number)).toEqual(analysis.sensitivity![0]);
    const eHeader = rows.findIndex((r) => r[0]?.startsWith("Elasticity E"));
    const elasticities = [rows[eHeader + 2]!, rows[eHeader + 3]!].flatMap((r) => r.slice(1).map(Number));
    expect(elasticities.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
    const vr = rows.findIndex((r) => r[0] === "Vital rate");
    expect(rows.slice(vr + 1, vr + 4).map((r) => r[0])).toEqual(["s_j", "s_a", "m"]);
    // No text cell in the whole file starts with a character a spreadsheet would run.
    for (const row of rows) for (const cell of row) if (Number.isNaN(Number(cell))) expect(cell).not.toMatch(/^[=+\-@\t\r]/);
  });
});

describe("life-cycle JSON", () => {
  it("round-trips exactly through the document reader", () => {
    const doc = lifeCycle({ notes: "Line one\nline two", rates: [{ id: "vr_sj", name: "s_j", value: 0.1 + 0.2, ci: { lower: 0.2, upper: 0.45, level: 0.95 } }, { id: "vr_sa", name: "s_a", value: 1e-17 }, { id: "vr_m", name: "m", value: 12345.678 }] });
    const text = lifeCycleJson(doc);
    expect(JSON.parse(text)).toMatchObject({ stagewright: 2 });
    expect(upgradeLifeCycle(JSON.parse(text))).toEqual(doc);
    expect(lifeCycleJson(upgradeLifeCycle(JSON.parse(text)))).toBe(text);
  });

  it("makes a file name from the life-cycle name", () => {
    expect(fileStem("Kessel Marsh newts — 2026")).toBe("kessel-marsh-newts-2026");
    expect(fileStem("Étang Süd")).toBe("etang-sud");
    expect(fileStem("===")).toBe("life-cycle");
  });
});
