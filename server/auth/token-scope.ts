import type { RequestHandler } from "express";
import type { ApiTokenScope } from "../../shared/schemas/auth";
import { forbidden } from "../http/errors";

const READ_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);
/** Writes in form only: they compute and store nothing, so a read token may call them. */
const READ_ONLY_POSTS = new Set(["/analyze", "/levers", "/ltre", "/climate/lambda", "/climate/fit", "/climate/trajectory"]);

/** The scope a Bearer token needs for a request (path relative to /api/v1, Express or OpenAPI style). */
export function scopeNeeded(method: string, path: string): ApiTokenScope {
  const m = method.toUpperCase();
  if (READ_METHODS.has(m)) return "read";
  return m === "POST" && READ_ONLY_POSTS.has(path) ? "read" : "read-write";
}

/** Refuses (403) a request whose Bearer token's scope is too narrow. Session requests pass. */
export const tokenScopeCheck: RequestHandler = (req, _res, next) => {
  if (req.authVia !== "token" || req.tokenScope === "read-write") return next();
  if (scopeNeeded(req.method, req.path) === "read") return next();
  next(forbidden("This API token may only read. Mint a read-write token in Settings to change things."));
};

/**
 * Signing in and out, and managing tokens and passwords, happen in the web app: a leaked
 * token cannot mint more tokens or lock its owner out, and token requests carry no session.
 */
export const sessionOnly: RequestHandler = (req, _res, next) => {
  next(req.authVia === "token" ? forbidden("Sign in, manage passwords and API tokens in the Stagewright web app, not with an API token.") : undefined);
};
