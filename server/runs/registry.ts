import type { RunKinds } from "./kinds";
import { riskRun } from "./risk";

/** Every kind of Run the server can start and the workers can compute. */
export const RUN_KINDS: RunKinds = {
  risk: riskRun as RunKinds[string],
};
