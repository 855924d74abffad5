/**
 * The one door to the Stagewright server. Every request of the client goes
 * through `api`: JSON in and out, the session cookie sent, the double-submit
 * CSRF header added to writes, and every failure turned into an `ApiError`.
 * Components never call this directly; the resource modules beside it do.
 */
import type { ApiError as ApiErrorBody } from "../../shared/schemas";

export const API_BASE = "/api/v1";
/** Cookie the server sets on GET /auth/session; echoed back in CSRF_HEADER on every write. */
export const CSRF_COOKIE = "sw_csrf";
export const CSRF_HEADER = "X-CSRF-Token";

export type FieldProblem = { path: string; message: string };

/** A failed request: HTTP status (0 when the server could not be reached), code, readable message, field problems. */
export class ApiError extends Error {
  override readonly name = "ApiError";
  readonly status: number;
  readonly code: string;
  readonly fields: FieldProblem[];
  /** The whole error body, for answers that carry more than the error (a 409 sends the current state as `current`). */
  readonly body: unknown;

  constructor(status: number, code: string, message: string, fields: FieldProblem[] = [], body: unknown = null) {
    super(message);
    this.status = status;
    this.code = code;
    this.fields = fields;
    this.body = body;
  }
}

export function isApiError(error: unknown): error is ApiError {
  return error instanceof ApiError;
}

/** What to say when the server's answer carries no readable error body. */
const FALLBACK_MESSAGES: Record<number, string> = {
  400: "The server could not use that request.",
  401: "Sign in to continue.",
  403: "Your role in this Study does not allow that.",
  404: "Not found. It may have been removed, or you may not have access to it.",
  409: "Someone else changed this in the meantime. Reload and try again.",
  429: "Too many attempts in a short time. Wait a minute, then try again.",
  // What a proxy in front of the server answers when the server is down.
  502: "Stagewright cannot reach its server. It may be restarting: try again in a moment.",
  504: "Stagewright cannot reach its server. It may be restarting: try again in a moment.",
};

function readCookie(name: string): string | null {
  for (const part of document.cookie.split(";")) {
    const [key, ...rest] = part.trim().split("=");
    if (key === name) return decodeURIComponent(rest.join("="));
  }
  return null;
}

/** The CSRF cookie comes with GET /auth/session; fetch it once if a write finds it missing. */
async function csrfToken(): Promise<string | null> {
  const existing = readCookie(CSRF_COOKIE);
  if (existing) return existing;
  await fetch(`${API_BASE}/auth/session`, { credentials: "same-origin" }).catch(() => undefined);
  return readCookie(CSRF_COOKIE);
}

function isErrorBody(value: unknown): value is ApiErrorBody {
  if (typeof value !== "object" || value === null || !("error" in value)) return false;
  const error = (value as { error: unknown }).error;
  return typeof error === "object" && error !== null && typeof (error as { message?: unknown }).message === "string";
}

async function toApiError(response: Response): Promise<ApiError> {
  let body: unknown = null;
  try {
    body = await response.json();
  } catch {
    // Not JSON (a proxy error page, an empty body): fall back to the status.
  }
  if (isErrorBody(body)) {
    const { code, message, fields } = body.error;
    return new ApiError(response.status, code ?? "error", message, fields ?? [], body);
  }
  const message =
    FALLBACK_MESSAGES[response.status] ??
    (response.status >= 500
      ? `The Stagewright server had a problem (HTTP ${response.status}). Try again in a moment.`
      : `The request failed (HTTP ${response.status}).`);
  return new ApiError(response.status, response.status >= 500 ? "internal" : "error", message);
}

type Method = "GET" | "POST" | "PATCH" | "PUT" | "DELETE";

async function request<T>(method: Method, path: string, body?: unknown, signal?: AbortSignal, isRetry = false): Promise<T> {
  const headers: Record<string, string> = { Accept: "application/json" };
  const isForm = body instanceof FormData;
  if (body !== undefined && !isForm) headers["Content-Type"] = "application/json";
  if (method !== "GET") {
    const token = await csrfToken();
    if (token) headers[CSRF_HEADER] = token;
  }

  let response: Response;
  try {
    response = await fetch(`${API_BASE}${path}`, {
      method,
      headers,
      body: body === undefined ? undefined : isForm ? body : JSON.stringify(body),
      credentials: "same-origin",
      signal,
    });
  } catch (cause) {
    if (signal?.aborted) throw cause;
    throw new ApiError(0, "network", "Stagewright cannot reach its server. Check your connection, then try again.");
  }

  if (!response.ok) {
    const error = await toApiError(response);
    // A stale CSRF cookie (after a server restart with a new secret, say): the
    // refusal itself carries a fresh cookie, so one more try succeeds.
    if (error.status === 403 && error.code === "csrf" && !isRetry) return request<T>(method, path, body, signal, true);
    throw error;
  }
  if (response.status === 204) return undefined as T;
  const text = await response.text();
  return (text ? JSON.parse(text) : undefined) as T;
}

/** A file from the server (PDF, zip), with the name it asked to be saved as. */
export interface DownloadedFile {
  blob: Blob;
  fileName: string;
}

async function requestFile(path: string, fallbackName: string, signal?: AbortSignal): Promise<DownloadedFile> {
  let response: Response;
  try {
    response = await fetch(`${API_BASE}${path}`, { credentials: "same-origin", signal });
  } catch (cause) {
    if (signal?.aborted) throw cause;
    throw new ApiError(0, "network", "Stagewright cannot reach its server. Check your connection, then try again.");
  }
  if (!response.ok) throw await toApiError(response);
  const disposition = response.headers.get("Content-Disposition") ?? "";
  const fileName = /filename="([^"]+)"/.exec(disposition)?.[1] ?? fallbackName;
  return { blob: await response.blob(), fileName };
}

/** Encode one path segment (ids and tokens come from URLs and must not break out of their segment). */
export function segment(value: string): string {
  return encodeURIComponent(value);
}

export const api = {
  get: <T>(path: string, signal?: AbortSignal) => request<T>("GET", path, undefined, signal),
  post: <T>(path: string, body?: unknown, signal?: AbortSignal) => request<T>("POST", path, body ?? {}, signal),
  patch: <T>(path: string, body: unknown) => request<T>("PATCH", path, body),
  put: <T>(path: string, body: unknown) => request<T>("PUT", path, body),
  delete: (path: string) => request<void>("DELETE", path),
  /** multipart/form-data (file uploads); the browser sets the boundary. */
  postForm: <T>(path: string, form: FormData) => request<T>("POST", path, form),
  /** GET a file; failures become ApiErrors like any other request. */
  file: (path: string, fallbackName: string, signal?: AbortSignal) => requestFile(path, fallbackName, signal),
};
