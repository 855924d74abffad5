import type { RequestHandler } from "express";
import { badRequest } from "./errors";

// U+0000, or a UTF-16 surrogate without its partner: PostgreSQL stores neither (text refuses NUL, jsonb both).
// eslint-disable-next-line no-control-regex -- finding NUL is the point
const UNSTORABLE = /\u0000|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

/** The path to the first unstorable string (built on the way back up, so clean bodies allocate nothing), or null. */
function findUnstorable(value: unknown, depth = 0): string[] | null {
  if (typeof value === "string") return UNSTORABLE.test(value) ? [] : null;
  if (depth > 200 || value === null || typeof value !== "object") return null;
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const inner: unknown = value[i];
      if (typeof inner !== "string" && (inner === null || typeof inner !== "object")) continue;
      const found = findUnstorable(inner, depth + 1);
      if (found) return [String(i), ...found];
    }
    return null;
  }
  for (const key in value) {
    if (!Object.hasOwn(value, key)) continue;
    if (UNSTORABLE.test(key)) return [key.replace(UNSTORABLE, "\uFFFD")];
    const found = findUnstorable((value as Record<string, unknown>)[key], depth + 1);
    if (found) return [key, ...found];
  }
  return null;
}

/**
 * Refuses a JSON body holding text the database cannot store, naming the
 * field, for every route at once (otherwise the insert fails with a 500).
 */
export const storableText: RequestHandler = (req, _res, next) => {
  const path = findUnstorable(req.body);
  if (!path) return next();
  const field = path.join(".") || "(body)";
  const message = "Text cannot contain the NUL character (U+0000) or a lone UTF-16 surrogate; remove it and try again.";
  next(badRequest(`${field}: ${message}`, [{ path: field, message }]));
};
