import type { Router } from "express";
import { createApiRouter } from "../../server/app";
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
