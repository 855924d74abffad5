import { createHmac, randomBytes } from "node:crypto";
import type { Router } from "express";
import { createApiRouter } from "../../server/app";
import { sessions } from "../../server/db/schema";
import type { TestServer } from "./server";

/** The API router as the app mounts it, built with the test server's config (so the Mail outbox routes are there). */
export function apiRouter(server: TestServer): Router {
  return createApiRouter({
    db: server.db,
    pool: server.pool,
    config: server.config,
    mailer: { send: async () => {}, close: () => {} },
    kinds: {},
    jobs: { sendChunks: async () => {}, stop: async () => {} },
  });
}

/** "GET /life-cycles/:lifeCycleId" for every route on the router. */
export function routesOf(router: Router): string[] {
  const out: string[] = [];
  for (const layer of router.stack as { route?: { path: string; methods: Record<string, boolean> } }[]) {
    if (!layer.route) continue;
    for (const m of Object.keys(layer.route.methods)) out.push(`${m.toUpperCase()} ${layer.route.path}`);
  }
  return out;
}

/** "GET /life-cycles/{lifeCycleId}" for every operation of an OpenAPI document. */
export function documentedOperations(doc: { paths: Record<string, Record<string, unknown>> }): string[] {
  const methods = new Set(["get", "put", "post", "delete", "patch", "head", "options"]);
  return Object.entries(doc.paths).flatMap(([p, item]) => Object.keys(item).filter((m) => methods.has(m)).map((m) => `${m.toUpperCase()} ${p}`));
}

/** Mounted routes missing from the document, and documented operations that are not mounted. */
export function compareRoutes(mounted: string[], documented: string[]): { undocumented: string[]; notMounted: string[] } {
  const asOpenApi = (r: string) => r.replace(/:([A-Za-z0-9_]+)/g, "{$1}");
  const mountedSet = new Set(mounted.map(asOpenApi));
  const documentedSet = new Set(documented);
  return {
    undocumented: [...mountedSet].filter((r) => !documentedSet.has(r)).sort(),
    notMounted: [...documentedSet].filter((r) => !mountedSet.has(r)).sort(),
  };
}

export interface MountedRoute {
  method: "GET" | "POST" | "PUT" | "PATCH" | "DELETE";
  /** Express path, e.g. `/life-cycles/:lifeCycleId`. */
  path: string;
  /** `METHOD path`, the key the authorisation matrix uses. */
  key: string;
  /** Names of the path parameters, in order. */
  params: string[];
}

/** Every route mounted on the API router (the same enumeration the authorisation matrix uses). */
export function mountedRoutes(server: TestServer): MountedRoute[] {
  const router = createApiRouter({
    db: server.db,
    pool: server.pool,
    config: { ...server.config, mailOutbox: true },
    mailer: { send: async () => {}, close: () => {} },
    kinds: {},
    jobs: { sendChunks: async () => {}, stop: async () => {} },
  });
  const out: MountedRoute[] = [];
  for (const layer of router.stack as { route?: { path: string; methods: Record<string, boolean> } }[]) {
    if (!layer.route) continue;
    for (const m of Object.keys(layer.route.methods)) {
      if (m === "_all") continue;
      const method = m.toUpperCase() as MountedRoute["method"];
      const path = layer.route.path;
      out.push({ method, path, key: `${method} ${path}`, params: [...path.matchAll(/:(\w+)/g)].map((x) => x[1]!) });
    }
  }
  return out;
}

export const isWrite = (r: MountedRoute) => r.method !== "GET";

/**
 * Cookie and CSRF headers of a fresh web session of `userId`, made the way
 * express-session stores one (a row in `session`, the id signed with the
 * session secret): as many sessions as a test needs, without signing in
 * through the rate-limited route.
 */
export async function sessionHeaders(server: TestServer, userId: string): Promise<{ cookie: string; "x-csrf-token": string }> {
  const sid = randomBytes(24).toString("base64url");
  const expires = new Date(Date.now() + 86_400_000);
  await server.db.insert(sessions).values({
    sid,
    sess: { cookie: { originalMaxAge: 86_400_000, expires: expires.toISOString(), httpOnly: true, path: "/", sameSite: "lax" }, passport: { user: userId } },
    expire: expires,
  });
  const signed = `s:${sid}.${createHmac("sha256", server.config.sessionSecret).update(sid).digest("base64").replace(/=+$/, "")}`;
  const res = await fetch(`${server.url}/api/v1/auth/session`);
  const csrf = res.headers.getSetCookie().find((c) => c.startsWith("sw_csrf="))!.split(";")[0]!.slice("sw_csrf=".length);
  return { cookie: `sw_session=${encodeURIComponent(signed)}; sw_csrf=${csrf}`, "x-csrf-token": decodeURIComponent(csrf) };
}
