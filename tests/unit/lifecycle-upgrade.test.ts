import { describe, expect, it, vi } from "vitest";
import { ZodError } from "zod";
import {
  LIFE_CYCLE_SCHEMA_VERSION,
  LifeCycleUpgradeError,
  UPGRADE_STEPS,
  upgradeLifeCycle,
  type RawDocument,
  type UpgradeStep,
} from "../../shared/lifecycle";

function currentDocument(overrides: RawDocument = {}): RawDocument {
  return {
    stagewright: LIFE_CYCLE_SCHEMA_VERSION,
    name: "Pond",
    census: "post-breeding",
    timeStepUnit: "year",
    stages: [{ id: "st_a", name: "Adult", position: { x: 0, y: 0 } }],
    rates: [{ id: "vr_s", name: "s", value: 0.7 }],
    transitions: [{ id: "tr_s", from: "st_a", to: "st_a", kind: "stasis", rate: "s" }],
    ...overrides,
  };
}

function upgradeError(raw: unknown, steps?: Record<number, UpgradeStep>): LifeCycleUpgradeError {
  try {
    upgradeLifeCycle(raw, steps ? { steps } : {});
  } catch (err) {
    if (err instanceof LifeCycleUpgradeError) return err;
    throw err;
  }
  throw new Error("expected the upgrade to fail");
}

describe("upgradeLifeCycle", () => {
  it("reads a document of the current version", () => {
    expect(upgradeLifeCycle(currentDocument())).toMatchObject({ name: "Pond", stagewright: LIFE_CYCLE_SCHEMA_VERSION });
  });

  it.each([null, [], "a life cycle", 3])("refuses %j as not an object", (raw) => {
    expect(upgradeError(raw).code).toBe("not-an-object");
  });

  it("refuses a document without a version", () => {
    const { stagewright: _ignored, ...rest } = currentDocument();
    const err = upgradeError(rest);
    expect(err.code).toBe("missing-version");
    expect(err.message).toBe('This is not a Stagewright life cycle: the "stagewright" format version field is missing.');
  });

  it.each([1.5, "1", null, Number.NaN, true])("refuses the version %j", (version) => {
    const err = upgradeError(currentDocument({ stagewright: version }));
    expect(err.code).toBe("invalid-version");
    expect(err.message).toContain("must be a whole number");
  });

  it("refuses a document from a newer build, saying what to do", () => {
    const err = upgradeError(currentDocument({ stagewright: LIFE_CYCLE_SCHEMA_VERSION + 1 }));
    expect(err.code).toBe("newer-version");
    expect(err.message).toBe(
      `This life cycle was saved by a newer Stagewright (format version ${LIFE_CYCLE_SCHEMA_VERSION + 1}); this build reads versions up to ${LIFE_CYCLE_SCHEMA_VERSION}. Update Stagewright to open it.`,
    );
  });

  it("refuses an older version it has no step for", () => {
    const err = upgradeError(currentDocument({ stagewright: LIFE_CYCLE_SCHEMA_VERSION - 1 }), {});
    expect(err.code).toBe("no-upgrade-path");
    expect(err.message).toContain(`no upgrade from version ${LIFE_CYCLE_SCHEMA_VERSION - 1}`);
  });

  it("runs an injected step and parses its result, leaving the input untouched", () => {
    const from = LIFE_CYCLE_SCHEMA_VERSION - 1;
    // A made-up older format that called the time step "interval".
    const old: RawDocument = { ...currentDocument({ stagewright: from }), interval: "year" };
    delete old.timeStepUnit;
    const snapshot = structuredClone(old);
    const step = vi.fn<UpgradeStep>(({ interval, ...doc }) => ({ ...doc, timeStepUnit: interval }));
    const doc = upgradeLifeCycle(old, { steps: { [from]: step } });
    expect(step).toHaveBeenCalledTimes(1);
    expect(step.mock.calls[0]![0]).toEqual(snapshot);
    expect(doc.timeStepUnit).toBe("year");
    expect(doc.stagewright).toBe(LIFE_CYCLE_SCHEMA_VERSION);
    expect(old).toEqual(snapshot);
  });

  it("chains steps in version order", () => {
    const order: number[] = [];
    const first = LIFE_CYCLE_SCHEMA_VERSION - 2;
    const steps: Record<number, UpgradeStep> = {
      [first + 1]: (d) => (order.push(d.stagewright as number), { ...d, name: `${String(d.name)} (2)` }),
      [first]: (d) => (order.push(d.stagewright as number), { ...d, name: `${String(d.name)} (1)` }),
    };
    const doc = upgradeLifeCycle(currentDocument({ stagewright: first }), { steps });
    expect(order).toEqual([first, first + 1]);
    expect(doc.name).toBe("Pond (1) (2)");
  });

  it("validates the upgraded document with LifeCycleSchema", () => {
    const from = LIFE_CYCLE_SCHEMA_VERSION - 1;
    const broken: UpgradeStep = (d) => ({ ...d, census: "sometimes" });
    expect(() => upgradeLifeCycle(currentDocument({ stagewright: from }), { steps: { [from]: broken } })).toThrow(ZodError);
    expect(() => upgradeLifeCycle(currentDocument({ stages: "none" }))).toThrow(ZodError);
  });

  it("reads a stored version-1 document as version 2 with its content unchanged", () => {
    // A document as version 1 wrote it (before scenarios, thermal responses and rate uncertainty beyond SE/CI).
    const version1 = {
      stagewright: 1,
      name: "Pond",
      census: "post-breeding",
      timeStepUnit: "year",
      stages: [
        { id: "st_j", name: "Juvenile", position: { x: 0, y: 0 } },
        { id: "st_a", name: "Adult", position: { x: 200, y: 0 } },
      ],
      rates: [
        { id: "vr_sj", name: "s_j", value: 0.3, se: 0.04, source: "invented" },
        { id: "vr_sa", name: "s_a", value: 0.8, ci: { lower: 0.7, upper: 0.88, level: 0.95 } },
        { id: "vr_m", name: "m", value: 2.5 },
      ],
      transitions: [
        { id: "tr_g", from: "st_j", to: "st_a", kind: "growth", rate: "s_j" },
        { id: "tr_s", from: "st_a", to: "st_a", kind: "stasis", rate: "s_a" },
        { id: "tr_f", from: "st_a", to: "st_j", kind: "reproduction", rate: "s_a * m" },
      ],
    };
    const frozen = structuredClone(version1);
    const doc = upgradeLifeCycle(version1);
    expect(doc).toEqual({ ...frozen, stagewright: 2 });
    expect(version1).toEqual(frozen);
  });

  it("has a registered step for every older version and none beyond", () => {
    for (const key of Object.keys(UPGRADE_STEPS)) expect(Number(key)).toBeLessThan(LIFE_CYCLE_SCHEMA_VERSION);
    for (let v = 1; v < LIFE_CYCLE_SCHEMA_VERSION; v++) expect(UPGRADE_STEPS[v], `step from version ${v}`).toBeTypeOf("function");
  });
});
