/**
 * Reading life-cycle documents written by any earlier Stagewright build.
 *
 * Each step turns a document of version v into one of version v + 1 and is
 * registered under v. To change the format: bump LIFE_CYCLE_SCHEMA_VERSION,
 * change LifeCycleSchema, and add the step from the previous version here
 * (with a test that upgrades a stored example of the old format).
 */
import { LIFE_CYCLE_SCHEMA_VERSION, LifeCycleSchema, type LifeCycle } from "./schema";

/** A plain JSON object as read from storage or a file. */
export type RawDocument = Record<string, unknown>;

/** Turns a document of version v into version v + 1 (the runner sets the `stagewright` field). */
export type UpgradeStep = (doc: RawDocument) => RawDocument;

/**
 * Version 1 → 2 added optional fields only (rate scale, dataset, counts,
 * distribution, thermal response; correlations, scenarios, climate), so a
 * version-1 document is a valid version-2 document once relabelled.
 */
function fromVersion1(doc: RawDocument): RawDocument {
  return doc;
}

/** Upgrade steps keyed by the version they upgrade from. */
export const UPGRADE_STEPS: Readonly<Record<number, UpgradeStep>> = Object.freeze({ 1: fromVersion1 });

export type LifeCycleUpgradeErrorCode = "not-an-object" | "missing-version" | "invalid-version" | "newer-version" | "no-upgrade-path";

/** The document cannot be brought to the current version (its content is checked afterwards by LifeCycleSchema). */
export class LifeCycleUpgradeError extends Error {
  override readonly name = "LifeCycleUpgradeError";
  constructor(
    readonly code: LifeCycleUpgradeErrorCode,
    message: string,
  ) {
    super(message);
  }
}

export interface UpgradeOptions {
  /** Replaces UPGRADE_STEPS (tests inject steps here). */
  steps?: Readonly<Record<number, UpgradeStep>>;
}

function isPlainObject(v: unknown): v is RawDocument {
  return typeof v === "object" && v !== null && !Array.isArray(v);
}

/**
 * Reads a life-cycle document of any supported version: checks the
 * `stagewright` version, runs the upgrade steps up to the current version,
 * then parses with LifeCycleSchema. Throws LifeCycleUpgradeError for a
 * missing, malformed or too-new version and ZodError for invalid content.
 * The input is never modified.
 */
export function upgradeLifeCycle(raw: unknown, options: UpgradeOptions = {}): LifeCycle {
  const steps = options.steps ?? UPGRADE_STEPS;
  if (!isPlainObject(raw)) {
    throw new LifeCycleUpgradeError("not-an-object", "This is not a Stagewright life cycle: expected a JSON object.");
  }
  if (!Object.hasOwn(raw, "stagewright")) {
    throw new LifeCycleUpgradeError(
      "missing-version",
      'This is not a Stagewright life cycle: the "stagewright" format version field is missing.',
    );
  }
  const version = raw.stagewright;
  if (typeof version !== "number" || !Number.isSafeInteger(version)) {
    throw new LifeCycleUpgradeError(
      "invalid-version",
      `The "stagewright" format version must be a whole number such as ${LIFE_CYCLE_SCHEMA_VERSION}; got ${JSON.stringify(version) ?? String(version)}.`,
    );
  }
  if (version > LIFE_CYCLE_SCHEMA_VERSION) {
    throw new LifeCycleUpgradeError(
      "newer-version",
      `This life cycle was saved by a newer Stagewright (format version ${version}); this build reads versions up to ${LIFE_CYCLE_SCHEMA_VERSION}. Update Stagewright to open it.`,
    );
  }
  let doc: RawDocument = raw;
  for (let v = version; v < LIFE_CYCLE_SCHEMA_VERSION; v++) {
    const step = Object.hasOwn(steps, v) ? steps[v] : undefined;
    if (step === undefined) {
      throw new LifeCycleUpgradeError(
        "no-upgrade-path",
        `Stagewright life-cycle format version ${v} cannot be read by this build: there is no upgrade from version ${v}.`,
      );
    }
    // Steps may modify what they are given; the caller's object stays untouched.
    doc = { ...step(structuredClone(doc)), stagewright: v + 1 };
  }
  return LifeCycleSchema.parse(doc);
}
