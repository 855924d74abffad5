import type { ErrorRequestHandler, RequestHandler } from "express";
import { ZodError } from "zod";
import type { ApiError } from "../../shared/schemas/errors";

/** An error with an HTTP status and a message meant for the person or script that sent the request. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly code: string = codeFor(status),
    readonly fields?: { path: string; message: string }[],
    /** Extra body members (e.g. the current state with a 409). */
    readonly extra?: Record<string, unknown>,
  ) {
    super(message);
  }
}

function codeFor(status: number): string {
  switch (status) {
    case 400: return "bad_request";
    case 401: return "unauthorized";
    case 403: return "forbidden";
    case 404: return "not_found";
    case 409: return "conflict";
    case 413: return "payload_too_large";
    case 429: return "too_many_requests";
    case 503: return "unavailable";
    default: return status >= 500 ? "internal" : "error";
  }
}

export const badRequest = (message: string, fields?: { path: string; message: string }[]) =>
  new HttpError(400, message, "bad_request", fields);
export const notFound = (what = "Not found.") => new HttpError(404, what);
export const forbidden = (message: string) => new HttpError(403, message);
export const unauthorized = (message = "Sign in first.") => new HttpError(401, message);
export const conflict = (message: string, extra?: Record<string, unknown>) =>
  new HttpError(409, message, "conflict", undefined, extra);

export function zodFields(err: ZodError): { path: string; message: string }[] {
  return err.issues.map((i) => ({ path: i.path.map(String).join(".") || "(body)", message: i.message }));
}

function body(status: number, message: string, code: string, fields?: ApiError["error"]["fields"]): ApiError {
  return { error: { code, message, ...(fields ? { fields } : {}) } };
}

/** JSON 404 for any unknown route under /api. */
export const apiNotFound: RequestHandler = (req, res) => {
  res.status(404).json(body(404, `No such API route: ${req.method} ${req.originalUrl.split("?")[0]}`, "not_found"));
};

/** The one error translator: ZodError → 400 with field paths; HttpError → its status; anything else → logged 500. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  if (res.headersSent) return;
  if (err instanceof ZodError) {
    const fields = zodFields(err);
    const first = fields[0];
    res.status(400).json(body(400, first ? `${first.path}: ${first.message}` : "Invalid input.", "bad_request", fields));
    return;
  }
  if (err instanceof HttpError) {
    res.status(err.status).json({ ...body(err.status, err.message, err.code, err.fields), ...err.extra });
    return;
  }
  // body-parser and friends set `status`/`type` on client errors (bad JSON, body too large).
  const status = typeof err?.status === "number" ? err.status : typeof err?.statusCode === "number" ? err.statusCode : 500;
  if (status >= 400 && status < 500) {
    const message =
      err.type === "entity.parse.failed" ? "The request body is not valid JSON."
      : err.type === "entity.too.large" ? "The request body is too large."
      : String(err.message ?? "Bad request.");
    res.status(status).json(body(status, message, codeFor(status)));
    return;
  }
  if (isDatabaseUnavailable(err)) {
    res.status(503).json(body(503, "The database is not reachable right now. Try again in a moment.", "unavailable"));
    return;
  }
  console.error(`500 on ${req.method} ${req.originalUrl}:`, err);
  res.status(500).json(body(500, "Something went wrong on the server. It has been logged.", "internal"));
};

function isDatabaseUnavailable(err: unknown): boolean {
  const e = err as { code?: string; cause?: { code?: string } } | undefined;
  const code = e?.cause?.code ?? e?.code;
  return code === "ECONNREFUSED" || code === "57P01" || code === "57P03" || code === "08006" || code === "08001";
}
