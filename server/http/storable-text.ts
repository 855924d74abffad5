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

const MESSAGE = "Text cannot contain the NUL character (U+0000) or a lone UTF-16 surrogate; remove it and try again.";

/** A 400 naming the first field (under `prefix`) whose text the database cannot store, or null when all of it can be stored. */
export function unstorableTextError(value: unknown, prefix: string[] = []): ReturnType<typeof badRequest> | null {
  const path = findUnstorable(value);
  if (!path) return null;
  const field = [...prefix, ...path].join(".") || "(body)";
  return badRequest(`${field}: ${MESSAGE}`, [{ path: field, message: MESSAGE }]);
}

/** Text the database can store: NUL characters and lone surrogates replaced by U+FFFD (for names the person did not type, such as a file's). */
export const storableVersion = (text: string): string => text.replace(new RegExp(UNSTORABLE.source, "g"), "\uFFFD");

/**
 * Refuses a JSON body holding text the database cannot store, naming the
 * field, for every route at once (otherwise the insert fails with a 500).
 * Multipart forms are parsed later, by their route: it calls unstorableTextError.
 */
export const storableText: RequestHandler = (req, _res, next) => {
  const path = findUnstorable(req.body);
  if (!path) return next();
  const field = path.join(".") || "(body)";
  next(badRequest(`${field}: ${MESSAGE}`, [{ path: field, message: MESSAGE }]));
};
