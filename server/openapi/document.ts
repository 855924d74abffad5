/**
 * The OpenAPI 3.1 document of /api/v1, built from OPERATIONS and the zod
 * schemas they name with zod's own JSON Schema output (draft 2020-12, which
 * is OpenAPI 3.1's schema dialect).
 */
import { z } from "zod";
import { ApiErrorSchema } from "../../shared/schemas/errors";
import { scopeNeeded } from "../auth/token-scope";
import { EXTRA_SCHEMAS, OPERATIONS, type Named, type Operation, type Response } from "./operations";

type Json = Record<string, unknown>;

/** "/life-cycles/:lifeCycleId/report.pdf" → "/life-cycles/{lifeCycleId}/report.pdf" */
export const openApiPath = (expressPath: string) => expressPath.replace(/:([A-Za-z0-9_]+)/g, "{$1}");

const ROLE_TEXT: Record<Operation["access"], string> = {
  public: "Anyone; no sign-in needed.",
  user: "Anyone signed in (session or token).",
  viewer: "Members of the Study with any role.",
  reviewer: "Members with the reviewer, editor or owner role.",
  editor: "Members with the editor or owner role.",
  owner: "The Study's owners.",
};

const PARAM_TEXT: Record<string, string> = {
  studyId: "The Study's id (uuid).",
  lifeCycleId: "The life cycle's id (uuid).",
  snapshotId: "The snapshot's id (uuid).",
  runId: "The Run's id (uuid).",
  userId: "The member's user id (uuid).",
  invitationId: "The invitation's id (uuid).",
  tokenId: "The API token's id (uuid).",
  token: "The secret from the invitation link.",
};

function jsonSchema(schema: z.ZodType, io: "input" | "output"): Json {
  const out = z.toJSONSchema(schema, { target: "draft-2020-12", io, unrepresentable: "any" }) as Json;
  delete out.$schema;
  return out;
}

export interface OpenApiOptions {
  /** Include development-only routes (the Mail outbox); true exactly when they are mounted. */
  includeDev: boolean;
  /** The server's public address, listed under `servers`. */
  publicUrl?: string;
}

export function buildOpenApiDocument(options: OpenApiOptions): Json {
  const components: Record<string, Json> = { ApiError: jsonSchema(ApiErrorSchema, "output") };
  const ref = (n: Named, io: "input" | "output") => {
    components[n.name] ??= jsonSchema(n.schema, io);
    return { $ref: `#/components/schemas/${n.name}` };
  };
  for (const n of EXTRA_SCHEMAS) ref(n, "input");
  const errorRef = { $ref: "#/components/schemas/ApiError" };
  const errorResponse = (description: string) => ({ description, content: { "application/json": { schema: errorRef } } });

  const response = (r: Response): Json => {
    if (r.file) return { description: r.description, content: { [r.file]: { schema: { type: "string", format: "binary" } } } };
    if (!r.json) return { description: r.description };
    if ("description" in r.json) {
      const schema = r.json.description === "ApiError" ? errorRef : { type: "object", description: r.json.description };
      return { description: r.description, content: { "application/json": { schema } } };
    }
    const schema = "list" in r.json ? { type: "array", items: ref(r.json.list, "output") } : ref(r.json, "output");
    return { description: r.description, content: { "application/json": { schema } } };
  };

  const paths: Record<string, Record<string, Json>> = {};
  for (const op of OPERATIONS) {
    if (op.devOnly && !options.includeDev) continue;
    const path = openApiPath(op.path);
    const scope = scopeNeeded(op.method, op.path);
    const parameters: Json[] = [...op.path.matchAll(/:([A-Za-z0-9_]+)/g)].map((m) => ({
      name: m[1],
      in: "path",
      required: true,
      description: PARAM_TEXT[m[1]!] ?? m[1],
      schema: m[1] === "token" ? { type: "string" } : { type: "string", format: "uuid" },
    }));
    if (op.query) {
      const q = jsonSchema(op.query.schema, "input") as { properties?: Record<string, Json>; required?: string[] };
      for (const [name, schema] of Object.entries(q.properties ?? {})) {
        parameters.push({ name, in: "query", required: q.required?.includes(name) ?? false, schema });
      }
    }
    const responses: Record<string, Json> = {};
    for (const r of op.responses) responses[String(r.status)] = response(r);
    if (op.body || op.query || op.multipart) responses["400"] ??= errorResponse("Bad input; error.fields names each field and what is wrong with it.");
    if (op.access !== "public") {
      responses["401"] ??= errorResponse("Not signed in, or the API token is unknown, revoked or expired.");
      responses["403"] ??= errorResponse(
        op.access === "user" ? "The API token's scope does not allow this request." : "Your role in the Study does not allow this, or the API token's scope does not.",
      );
    }
    if (op.path.includes(":")) responses["404"] ??= errorResponse("No such thing, or you are not a member of its Study.");

    const operation: Json = {
      operationId: `${op.method}${op.path.replace(/[:.]/g, "/").split(/[/-]/).filter(Boolean).map((w) => w[0]!.toUpperCase() + w.slice(1)).join("")}`,
      tags: [op.tag],
      summary: op.summary,
      description: [op.description, `Who may call it: ${ROLE_TEXT[op.access]}`, op.access === "public" ? null : `API token scope: ${scope}.`].filter(Boolean).join("\n\n"),
      "x-stagewright-access": op.access,
      ...(op.access === "public" ? { security: [] } : { "x-token-scope": scope }),
      ...(parameters.length ? { parameters } : {}),
      responses,
    };
    if (op.body) {
      const schema = "oneOf" in op.body ? { oneOf: op.body.oneOf.map((n) => ref(n, "input")) } : ref(op.body, "input");
      operation.requestBody = { required: true, content: { "application/json": { schema } } };
    }
    if (op.multipart) {
      type Obj = { properties?: Record<string, Json>; oneOf?: Obj[]; anyOf?: Obj[] };
      const fields = jsonSchema(op.multipart.fields.schema, "input") as Obj;
      // A union of uploads (counts or stage fates) lists the fields of every alternative.
      const all = [fields, ...(fields.oneOf ?? []), ...(fields.anyOf ?? [])].flatMap((o) => Object.entries(o.properties ?? {}));
      const properties: Record<string, Json> = { file: { type: "string", contentMediaType: "text/csv", description: "The CSV file." } };
      for (const [name, schema] of all) {
        if (name in properties) continue;
        properties[name] = schema.type === "object" || schema.anyOf || schema.oneOf ? { type: "string", description: `JSON text: ${JSON.stringify(schema).slice(0, 300)}` } : schema;
      }
      operation.requestBody = { required: true, description: op.multipart.description, content: { "multipart/form-data": { schema: { type: "object", properties, required: ["file"] } } } };
    }
    (paths[path] ??= {})[op.method] = operation;
  }

  return {
    openapi: "3.1.0",
    info: {
      title: "Stagewright API",
      version: "1",
      description:
        "Every JSON route of Stagewright. The web client calls the same routes with a session cookie and an X-CSRF-Token header; scripts send `Authorization: Bearer <token>` with a personal API token from Settings. Errors are JSON: { error: { code, message, fields } }.",
    },
    servers: [{ url: `${options.publicUrl ?? ""}/api/v1` }],
    tags: [...new Set(OPERATIONS.map((o) => o.tag))].map((name) => ({ name })),
    security: [{ bearerToken: [] }, { sessionCookie: [] }],
    paths,
    components: {
      schemas: components,
      securitySchemes: {
        bearerToken: { type: "http", scheme: "bearer", description: "A personal API token (Settings → API tokens), read or read-write, with an expiry." },
        sessionCookie: { type: "apiKey", in: "cookie", name: "sw_session", description: "The web client's session; writes also need the X-CSRF-Token header." },
      },
    },
  };
}
