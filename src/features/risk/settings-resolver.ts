/**
 * The Risk form's resolver: the form's values become a settings payload,
 * the shared RiskSettingsSchema checks it (through zodResolver, exactly as
 * the server will), and each problem goes back under the input it concerns.
 */
import { toNestErrors } from "@hookform/resolvers";
import { zodResolver } from "@hookform/resolvers/zod";
import type { FieldError, Resolver } from "react-hook-form";
import { RiskSettingsSchema, type RiskSettings } from "../../../shared/schemas/risk";
import { fieldOfSettingsPath, toSettings, type FormContext, type RiskFormValues } from "./settings-model";

/** Field name for problems that belong to no input (shown above the Start button). */
export const GENERAL_ERROR = "root.settings";

const checkSettings = zodResolver(RiskSettingsSchema);

/** Nested resolver errors as (dotted path, error) pairs. */
function flatten(errors: unknown, prefix: string, out: [string, FieldError][]): void {
  if (typeof errors !== "object" || errors === null) return;
  const e = errors as Record<string, unknown>;
  if (typeof e.message === "string" && typeof e.type === "string") {
    out.push([prefix, { type: e.type, message: e.message }]);
    return;
  }
  for (const [k, v] of Object.entries(e)) flatten(v, prefix ? `${prefix}.${k}` : k, out);
}

export const riskResolver: Resolver<RiskFormValues, FormContext, RiskSettings> = async (values, context, options) => {
  if (!context) throw new Error("The Risk form needs its context (candidate life cycles and rate ids).");
  const settings = toSettings(values, context);
  // No field names: zodResolver then nests a list's own problem under `…root`, beside its items' problems, and keeps both.
  const checked = await checkSettings(settings, undefined, { ...options, fields: {}, names: undefined, shouldUseNativeValidation: false } as unknown as Parameters<typeof checkSettings>[2]);
  const pairs: [string, FieldError][] = [];
  flatten(checked.errors, "", pairs);
  if (pairs.length === 0) return { values: checked.values as RiskSettings, errors: {} };
  const byField: Record<string, FieldError> = {};
  for (const [path, error] of pairs) {
    const field = fieldOfSettingsPath(path.replace(/\.root$/, ""), values, context) ?? GENERAL_ERROR;
    // The first problem of a field is the one to fix first.
    if (byField[field] === undefined) byField[field] = error;
    else if (field === GENERAL_ERROR) byField[field] = { ...byField[field], message: `${byField[field].message} ${error.message}` };
  }
  return { values: {}, errors: toNestErrors(byField, options) };
};
