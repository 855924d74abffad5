// The editor's document rules: the undo history, the diagram's edits (which
// must always leave a document the format accepts, or say why not), and
// reading a typed rate.
import { describe, expect, it } from "vitest";
import { emptyLifeCycle, LifeCycleSchema, type LifeCycle } from "../../shared/lifecycle";
import { addRates, addStage, addTransition, allowedKinds, moveStages, removeElements, renameStage } from "../../src/features/diagram/document-edits";
import { readRate, rateLabel } from "../../src/features/diagram/rate-text";
import { COALESCE_MS, historyReducer, startHistory } from "../../src/features/editor-state/document-history";

function withStages(...names: string[]): LifeCycle {
  let doc = emptyLifeCycle("Test life cycle");
  for (const name of names) {
    const added = addStage(doc);
    if (!added.ok) throw new Error(added.reason);
    const renamed = renameStage(added.document, added.id, name);
    if (!renamed.ok) throw new Error(renamed.reason);
    doc = renamed.document;
  }
  return doc;
}
const idOf = (doc: LifeCycle, name: string) => doc.stages.find((s) => s.name === name)!.id;

describe("diagram edits", () => {
  it("adds stages with distinct names at places that do not overlap", () => {
    const doc = withStages("Egg", "Larva", "Adult");
    expect(LifeCycleSchema.safeParse(doc).success).toBe(true);
    const xs = doc.stages.map((s) => s.position.x);
    expect(new Set(xs).size).toBe(3);
    const fourth = addStage(doc);
    expect(fourth.ok && fourth.document.stages.at(-1)!.name).toBe("Stage 4");
  });

  it("refuses a duplicate or empty stage name", () => {
    const doc = withStages("Egg", "Larva");
    expect(renameStage(doc, idOf(doc, "Larva"), "Egg")).toEqual({ ok: false, reason: "Another stage is already named “Egg”." });
    expect(renameStage(doc, idOf(doc, "Larva"), "   ")).toEqual({ ok: false, reason: "Give the stage a name." });
  });

  it("makes growth, then reproduction, between two stages; stasis, then reproduction, for a loop; then nothing", () => {
    let doc = withStages("Egg", "Adult");
    const egg = idOf(doc, "Egg");
    const adult = idOf(doc, "Adult");
    const kinds: string[] = [];
    for (let i = 0; i < 2; i++) {
      const r = addTransition(doc, egg, adult);
      if (!r.ok) throw new Error(r.reason);
      doc = r.document;
      kinds.push(doc.transitions.at(-1)!.kind);
    }
    for (let i = 0; i < 2; i++) {
      const r = addTransition(doc, adult, adult);
      if (!r.ok) throw new Error(r.reason);
      doc = r.document;
      kinds.push(doc.transitions.at(-1)!.kind);
    }
    expect(kinds).toEqual(["growth", "reproduction", "stasis", "reproduction"]);
    expect(LifeCycleSchema.safeParse(doc).success).toBe(true);
    expect(addTransition(doc, egg, adult)).toMatchObject({ ok: false, reason: expect.stringContaining("already has a survival arrow and a reproduction arrow") });
    expect(addTransition(doc, adult, adult)).toMatchObject({ ok: false, reason: expect.stringContaining("already has a stasis loop") });
    // The other direction is still free.
    expect(allowedKinds(doc, adult, egg)).toEqual(["growth", "shrinkage", "reproduction"]);
  });

  it("offers a kind change only to kinds the format allows beside the other arrows", () => {
    let doc = withStages("Egg", "Adult");
    const egg = idOf(doc, "Egg");
    const adult = idOf(doc, "Adult");
    const growth = addTransition(doc, egg, adult);
    if (!growth.ok) throw new Error(growth.reason);
    doc = growth.document;
    const repro = addTransition(doc, egg, adult);
    if (!repro.ok) throw new Error(repro.reason);
    doc = repro.document;
    // The growth arrow may become shrinkage but not reproduction (taken) nor stasis (not a loop).
    expect(allowedKinds(doc, egg, adult, growth.id)).toEqual(["growth", "shrinkage"]);
  });

  it("removes a stage together with its arrows", () => {
    let doc = withStages("Egg", "Larva", "Adult");
    for (const [from, to] of [["Egg", "Larva"], ["Larva", "Adult"], ["Adult", "Adult"]] as const) {
      const r = addTransition(doc, idOf(doc, from), idOf(doc, to));
      if (!r.ok) throw new Error(r.reason);
      doc = r.document;
    }
    const next = removeElements(doc, [idOf(doc, "Larva")], []);
    expect(next.stages.map((s) => s.name)).toEqual(["Egg", "Adult"]);
    expect(next.transitions).toHaveLength(1);
    expect(LifeCycleSchema.safeParse(next).success).toBe(true);
  });

  it("returns the same document when nothing moved, and whole-unit positions otherwise", () => {
    const doc = withStages("Egg");
    const egg = doc.stages[0]!;
    expect(moveStages(doc, new Map([[egg.id, { ...egg.position }]]))).toBe(doc);
    expect(moveStages(doc, new Map([[egg.id, { x: 10.6, y: -3.2 }]])).stages[0]!.position).toEqual({ x: 11, y: -3 });
  });

  it("adds missing vital rates once, with value 0", () => {
    const doc = addRates(addRates(emptyLifeCycle("Rates"), ["s_j", "m", "s_j"]), ["m"]);
    expect(doc.rates.map((r) => [r.name, r.value])).toEqual([
      ["s_j", 0],
      ["m", 0],
    ]);
  });
});

describe("readRate", () => {
  const doc = addRates(emptyLifeCycle("Rates"), ["s_j", "g_j"]);
  it("reads numbers and formulas of known vital rates", () => {
    expect(readRate(" 0.45 ", doc)).toEqual({ ok: true, rate: 0.45, as: "number" });
    expect(readRate("s_j * (1 - g_j)", doc)).toEqual({ ok: true, rate: "s_j * (1 - g_j)", as: "formula" });
  });
  it("explains what is wrong, naming unknown vital rates so they can be added", () => {
    expect(readRate("-0.2", doc)).toMatchObject({ ok: false, message: "A rate cannot be negative." });
    const unknown = readRate("s_j * m", doc);
    expect(unknown).toMatchObject({ ok: false, unknownRates: ["m"] });
    expect(!unknown.ok && unknown.message).toContain('Unknown vital rate "m"');
    const syntax = readRate("s_j *", doc);
    expect(syntax.ok).toBe(false);
    expect(!syntax.ok && syntax.unknownRates).toEqual([]);
  });
  it("labels arrows with 4 significant digits or a shortened formula", () => {
    expect(rateLabel(0.123456)).toBe("0.1235");
    expect(rateLabel(2)).toBe("2");
    expect(rateLabel("s_juvenile_first_year * (1 - g_juvenile)")).toBe("s_juvenile_first_year…");
  });
});

describe("undo history", () => {
  const a = emptyLifeCycle("A");
  const b = { ...a, name: "B" };
  const c = { ...a, name: "C" };

  it("undoes and redoes whole documents; a new change after an undo drops the redo steps", () => {
    let h = startHistory(a, 0);
    h = historyReducer(h, { type: "change", document: b, label: "Rename", now: 10_000 });
    h = historyReducer(h, { type: "change", document: c, label: "Other", now: 20_000 });
    h = historyReducer(h, { type: "undo" });
    expect(h.present.document).toBe(b);
    h = historyReducer(h, { type: "redo" });
    expect(h.present.document).toBe(c);
    h = historyReducer(h, { type: "undo" });
    h = historyReducer(h, { type: "undo" });
    expect(h.present.document).toBe(a);
    expect(historyReducer(h, { type: "undo" })).toBe(h);
    h = historyReducer(h, { type: "change", document: c, label: "Again", now: 30_000 });
    expect(h.future).toEqual([]);
    expect(h.past.map((e) => e.document)).toEqual([a]);
  });

  it("merges quick changes with the same label (typing, dragging) but never structural ones", () => {
    let h = startHistory(a, 0);
    h = historyReducer(h, { type: "change", document: b, label: "Rename", now: 5_000 });
    h = historyReducer(h, { type: "change", document: c, label: "Rename", now: 5_000 + COALESCE_MS / 2 });
    expect(h.past).toHaveLength(1);
    expect(h.present.document).toBe(c);
    const withStage = addStage(c);
    if (!withStage.ok) throw new Error(withStage.reason);
    h = historyReducer(h, { type: "change", document: withStage.document, label: "Rename", now: 5_000 + COALESCE_MS / 2 + 1 });
    expect(h.past).toHaveLength(2);
  });

  it("gives each document a revision number that is never reused", () => {
    let h = startHistory(a, 0);
    const first = h.present.revision;
    h = historyReducer(h, { type: "change", document: b, label: "x", now: 10_000 });
    const second = h.present.revision;
    h = historyReducer(h, { type: "undo" });
    expect(h.present.revision).toBe(first);
    h = historyReducer(h, { type: "change", document: c, label: "y", now: 20_000 });
    expect(new Set([first, second, h.present.revision]).size).toBe(3);
  });
});
