// A valid-looking example of a JSON Schema (the request bodies of
// /api/v1/openapi.json), for the fuzzer to mutate when a route has no
// hand-written seed. It follows required properties, enums, consts,
// formats, minimums and array lengths; anything it cannot satisfy only
// makes that route's cases shallower, never wrong.
type Schema = {
  $ref?: string;
  type?: string | string[];
  enum?: unknown[];
  const?: unknown;
  default?: unknown;
  examples?: unknown[];
  example?: unknown;
  format?: string;
  minimum?: number;
  exclusiveMinimum?: number | boolean;
  maximum?: number;
  minLength?: number;
  minItems?: number;
  items?: Schema;
  prefixItems?: Schema[];
  properties?: Record<string, Schema>;
  required?: string[];
  anyOf?: Schema[];
  oneOf?: Schema[];
  allOf?: Schema[];
};

export function sampleFromSchema(schema: Schema | undefined, root: { components?: { schemas?: Record<string, Schema> } }, depth = 0): unknown {
  if (!schema || depth > 12) return null;
  if (schema.$ref) {
    const name = schema.$ref.split("/").pop()!;
    return sampleFromSchema(root.components?.schemas?.[name], root, depth + 1);
  }
  if (schema.example !== undefined) return schema.example;
  if (schema.examples?.length) return schema.examples[0];
  if (schema.const !== undefined) return schema.const;
  if (schema.default !== undefined) return schema.default;
  if (schema.enum?.length) return schema.enum[0];
  const alt = schema.oneOf ?? schema.anyOf;
  if (alt?.length) return sampleFromSchema(alt[0], root, depth + 1);
  if (schema.allOf?.length) return Object.assign({}, ...schema.allOf.map((s) => sampleFromSchema(s, root, depth + 1) as object));
  const type = Array.isArray(schema.type) ? schema.type.find((t) => t !== "null") : schema.type;
  switch (type ?? (schema.properties ? "object" : undefined)) {
    case "object": {
      const out: Record<string, unknown> = {};
      for (const key of schema.required ?? []) out[key] = sampleFromSchema(schema.properties?.[key], root, depth + 1);
      return out;
    }
    case "array": {
      if (schema.prefixItems) return schema.prefixItems.map((s) => sampleFromSchema(s, root, depth + 1));
      return Array.from({ length: Math.max(schema.minItems ?? 1, 1) }, () => sampleFromSchema(schema.items, root, depth + 1));
    }
    case "string":
      if (schema.format === "uuid") return "00000000-0000-4000-8000-000000000000";
      if (schema.format === "email") return "someone@example.org";
      if (schema.format === "date-time") return "2026-01-01T00:00:00Z";
      if (schema.format === "date") return "2026-01-01";
      return "x".repeat(Math.max(schema.minLength ?? 1, 1));
    case "integer":
    case "number": {
      const min = typeof schema.exclusiveMinimum === "number" ? schema.exclusiveMinimum + 1 : (schema.minimum ?? 1);
      return schema.maximum !== undefined ? Math.min(min, schema.maximum) : min;
    }
    case "boolean":
      return true;
    default:
      return null;
  }
}
