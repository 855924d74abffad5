/** The OpenAPI document of /api/v1, for the API page. */
import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "./client";
import { queryKeys } from "./keys";

export interface OpenApiOperation {
  operationId: string;
  tags: string[];
  summary: string;
  description?: string;
  "x-stagewright-access": "public" | "user" | "viewer" | "reviewer" | "editor" | "owner";
  "x-token-scope"?: "read" | "read-write";
  parameters?: { name: string; in: "path" | "query"; required: boolean; description?: string; schema: JsonSchema }[];
  requestBody?: { content: Record<string, { schema: JsonSchema }> };
  responses: Record<string, { description: string; content?: Record<string, { schema: JsonSchema }> }>;
}

export interface JsonSchema {
  $ref?: string;
  type?: string | string[];
  description?: string;
  properties?: Record<string, JsonSchema>;
  required?: string[];
  items?: JsonSchema;
  enum?: unknown[];
  anyOf?: JsonSchema[];
  oneOf?: JsonSchema[];
  default?: unknown;
  minimum?: number;
  maximum?: number;
  minLength?: number;
  maxLength?: number;
  minItems?: number;
  maxItems?: number;
  format?: string;
  const?: unknown;
}

export interface OpenApiDocument {
  openapi: string;
  info: { title: string; version: string; description: string };
  servers: { url: string }[];
  tags: { name: string }[];
  paths: Record<string, Record<string, OpenApiOperation>>;
  components: { schemas: Record<string, JsonSchema> };
}

export const openApiQueryOptions = () =>
  queryOptions({
    queryKey: queryKeys.openApi,
    queryFn: ({ signal }) => api.get<OpenApiDocument>("/openapi.json", signal),
    staleTime: Infinity,
  });

export function useOpenApi() {
  return useQuery(openApiQueryOptions());
}
