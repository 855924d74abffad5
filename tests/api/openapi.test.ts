import { Validator } from "@seriousme/openapi-schema-validator";
import { Router } from "express";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { buildOpenApiDocument } from "../../server/openapi/document";
import { apiRouter, compareRoutes, documentedOperations, routesOf } from "../helpers/routes";
import { startTestServer, type TestServer } from "../helpers/server";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server?.close();
});

describe("OpenAPI document", () => {
  it("is served at /api/v1/openapi.json to anyone and passes the OpenAPI 3.1 schema", async () => {
    const res = await (await import("supertest")).default(server.app).get("/api/v1/openapi.json");
    expect(res.status).toBe(200);
    expect(res.body.openapi).toBe("3.1.0");
    const validator = new Validator();
    const result = await validator.validate(res.body);
    expect(result.errors ?? []).toEqual([]);
    expect(result.valid).toBe(true);
    expect(validator.version).toBe("3.1");
    // The validator is not a rubber stamp: a reference to a schema that does not exist fails.
    const broken = structuredClone(res.body);
    broken.paths["/studies"].get.responses["200"].content["application/json"].schema = { $ref: "#/components/schemas/Nowhere" };
    expect((await new Validator().validate(broken)).valid).toBe(false);
  });

  it("documents every mounted route, and mounts every documented one", async () => {
    const doc = (await (await import("supertest")).default(server.app).get("/api/v1/openapi.json")).body;
    expect(compareRoutes(routesOf(apiRouter(server)), documentedOperations(doc))).toEqual({ undocumented: [], notMounted: [] });
  });

  it("would catch a route added without a description, and a description without a route", () => {
    const router = apiRouter(server);
    const extra = Router();
    extra.get("/studies/:studyId/something-new", (_req, res) => res.end());
    const mounted = [...routesOf(router), ...routesOf(extra)];
    const documented = documentedOperations(buildOpenApiDocument({ includeDev: true }) as never);
    expect(compareRoutes(mounted, documented).undocumented).toEqual(["GET /studies/{studyId}/something-new"]);
    expect(compareRoutes(mounted, [...documented, "POST /nowhere"]).notMounted).toEqual(["POST /nowhere"]);
  });

  it("leaves out the development-only Mail outbox when it is not mounted", () => {
    const ops = documentedOperations(buildOpenApiDocument({ includeDev: false }) as never);
    expect(ops).not.toContain("GET /dev/mail");
    expect(ops).toContain("GET /openapi.json");
  });

  it("describes request bodies with the zod schemas the routes parse", () => {
    const doc = buildOpenApiDocument({ includeDev: false });
    const at = (...keys: string[]): unknown => keys.reduce<unknown>((x, k) => (x as Record<string, unknown> | undefined)?.[k], doc);
    expect(at("paths", "/account/tokens", "post", "requestBody", "content", "application/json", "schema")).toEqual({ $ref: "#/components/schemas/ApiTokenCreate" });
    expect(at("components", "schemas", "ApiTokenCreate", "properties", "scope", "enum")).toEqual(["read", "read-write"]);
    expect(at("components", "schemas", "ApiTokenCreate", "properties", "expiresInDays", "anyOf", "0")).toMatchObject({ type: "integer", minimum: 1, maximum: 366 });
    expect(at("components", "schemas", "ApiTokenCreate", "required")).toEqual(["name"]);
    // Scope and role of each operation, for people and for tools.
    expect(at("paths", "/studies/{studyId}", "patch", "x-stagewright-access")).toBe("owner");
    expect(at("paths", "/studies/{studyId}", "patch", "x-token-scope")).toBe("read-write");
    expect(at("paths", "/analyze", "post", "x-token-scope")).toBe("read");
    const params = at("paths", "/life-cycles/{lifeCycleId}/report.pdf", "get", "parameters") as { name: string }[];
    expect(params.map((p) => p.name)).toEqual(["lifeCycleId", "snapshot", "paper"]);
  });
});
