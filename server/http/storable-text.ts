import type { RequestHandler } from "express";
import { badRequest } from "./errors";

// U+0000, or a UTF-16 surrogate without its partner: PostgreSQL stores neither (text refuses NUL, jsonb both).
// eslint-disable-next-line no-control-regex -- finding NUL is the point
const UNSTORABLE = /\u0000|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

function findUnstorable(value: unknown, path: string[], depth = 0): string[] | null {
  if (typeof value === "string") return UNSTORABLE.test(value) ? path : null;
  if (depth > 200 || value === null || typeof value !== "object") return null;
  for (const [key, inner] of Object.entries(value)) {
    if (UNSTORABLE.test(key)) return [...path, key.replace(UNSTORABLE, "\uFFFD")];
    const found = findUnstorable(inner, [...path, key], depth + 1);
    if (found) return found;
  }
  return null;
}

/**
 * Refuses a JSON body holding text the database cannot store, naming the
 * field, for every route at once (otherwise the insert fails with a 500).
 */
export const storableText: RequestHandler = (req, _res, next) => {
  const path = findUnstorable(req.body, []);
  if (!path) return next();
  const field = path.join(".") || "(body)";
  const message = "Text cannot contain the NUL character (U+0000) or a lone UTF-16 surrogate; remove it and try again.";
  next(badRequest(`${field}: ${message}`, [{ path: field, message }]));
};
