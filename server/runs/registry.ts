import type { RunKinds } from "./kinds";
import { bootstrapRun } from "./bootstrap";
import { riskRun } from "./risk";
import { uncertaintyRun } from "./uncertainty";
import { warmingRun } from "./warming";

/** Every kind of Run the server can start and the workers can compute. */
export const RUN_KINDS: RunKinds = {
  risk: riskRun as RunKinds[string],
  uncertainty: uncertaintyRun as RunKinds[string],
  bootstrap: bootstrapRun as RunKinds[string],
  warming: warmingRun as RunKinds[string],
};
