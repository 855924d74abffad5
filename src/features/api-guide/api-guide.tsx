/**
 * The API page: the OpenAPI document of /api/v1 in readable form, grouped by
 * tag, with who may call each route, the token scope it needs and the fields
 * of its request body (from the same zod schemas the server checks with).
 */
import type { ReactNode } from "react";
import { type JsonSchema, type OpenApiDocument, type OpenApiOperation, useOpenApi } from "../../api/openapi";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { TextLink } from "../../components/ui/text-link";

const ACCESS: Record<OpenApiOperation["x-stagewright-access"], string> = {
  public: "anyone",
  user: "anyone signed in",
  viewer: "Study members",
  reviewer: "reviewers, editors, owners",
  editor: "editors and owners",
  owner: "owners",
};
const METHOD_STYLE: Record<string, string> = {
  get: "border-spruce text-spruce",
  post: "border-indigo text-indigo",
  put: "border-indigo text-indigo",
  patch: "border-indigo text-indigo",
  delete: "border-brick text-brick",
};

function resolve(doc: OpenApiDocument, schema: JsonSchema): { name: string | null; schema: JsonSchema } {
  if (!schema.$ref) return { name: null, schema };
  const name = schema.$ref.split("/").pop()!;
  return { name, schema: doc.components.schemas[name] ?? {} };
}

/** "string, 1–100 characters", "integer 1–366 or null", "one of read, read-write". */
function typeText(doc: OpenApiDocument, s: JsonSchema): string {
  const r = resolve(doc, s);
  if (r.name) return r.name;
  const x = r.schema;
  if (x.enum) return `one of ${x.enum.map((v) => JSON.stringify(v)).join(", ")}`;
  if (x.const !== undefined) return JSON.stringify(x.const);
  const alternatives = x.anyOf ?? x.oneOf;
  if (alternatives) return alternatives.map((a) => typeText(doc, a)).join(" or ");
  const type = Array.isArray(x.type) ? x.type.join(" or ") : (x.type ?? "any JSON");
  if (type === "array") return `list of ${x.items ? typeText(doc, x.items) : "values"}${x.minItems !== undefined || x.maxItems !== undefined ? ` (${x.minItems ?? 0}–${x.maxItems ?? "…"} items)` : ""}`;
  const bounds =
    x.minimum !== undefined || x.maximum !== undefined
      ? ` ${x.minimum ?? "…"}–${x.maximum ?? "…"}`
      : x.minLength !== undefined || x.maxLength !== undefined
        ? `, ${x.minLength ?? 0}–${x.maxLength ?? "…"} characters`
        : "";
  return `${x.format ? `${type} (${x.format})` : type}${bounds}`;
}

function Fields({ doc, schema, depth = 0 }: { doc: OpenApiDocument; schema: JsonSchema; depth?: number }) {
  const { schema: s } = resolve(doc, schema);
  const alternatives = s.anyOf ?? s.oneOf;
  if (alternatives && !s.properties) {
    return (
      <div className="space-y-2">
        <p className="text-sm">One of:</p>
        {alternatives.map((alt, i) => (
          <div key={i} className="border-l-2 border-ink/20 pl-3">
            <Fields doc={doc} schema={alt} depth={depth + 1} />
          </div>
        ))}
      </div>
    );
  }
  if (!s.properties) return <p className="text-sm">{typeText(doc, schema)}</p>;
  return (
    <table className="w-full text-sm">
      <thead>
        <tr className="text-left">
          <th scope="col" className="py-1 pr-3">Field</th>
          <th scope="col" className="py-1 pr-3">Type</th>
          <th scope="col" className="py-1">Notes</th>
        </tr>
      </thead>
      <tbody>
        {Object.entries(s.properties).map(([name, p]) => {
          const nested = resolve(doc, p);
          return (
            <tr key={name} className="border-t border-ink/10 align-top">
              <th scope="row" className="py-1 pr-3 text-left font-mono">
                {name}
                {s.required?.includes(name) ? "" : "?"}
              </th>
              <td className="py-1 pr-3">{typeText(doc, p)}</td>
              <td className="py-1">
                {s.required?.includes(name) ? "required" : "optional"}
                {p.default !== undefined && `; default ${JSON.stringify(p.default)}`}
                {nested.schema.description && `. ${nested.schema.description}`}
              </td>
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}

function Operation({ doc, method, path, op }: { doc: OpenApiDocument; method: string; path: string; op: OpenApiOperation }) {
  const body = op.requestBody?.content["application/json"]?.schema;
  const params = op.parameters ?? [];
  const note = op.description?.split("\n\n")[0];
  return (
    <li className="rounded-md border border-ink/15 bg-white p-4">
      <h3 className="flex flex-wrap items-baseline gap-2">
        <span className={`rounded border px-1.5 font-mono text-sm font-bold uppercase ${METHOD_STYLE[method] ?? ""}`}>{method}</span>
        <code className="font-mono font-bold break-all">/api/v1{path}</code>
      </h3>
      <p className="mt-1">{op.summary}</p>
      <p className="mt-1 text-sm text-ink/80">
        Who: {ACCESS[op["x-stagewright-access"]]}
        {op["x-token-scope"] && <> · token scope: {op["x-token-scope"] === "read" ? "read (any token)" : "read-write"}</>}
      </p>
      {note && !note.startsWith("Who may call it") && <p className="mt-1 text-sm">{note}</p>}
      {(params.length > 0 || body) && (
        <details className="mt-2">
          <summary className="cursor-pointer text-sm font-bold text-indigo">Parameters and body</summary>
          <div className="mt-2 space-y-3">
            {params.length > 0 && (
              <ul className="space-y-1 text-sm">
                {params.map((p) => (
                  <li key={`${p.in}-${p.name}`}>
                    <code className="font-mono">{p.in === "query" ? `?${p.name}=` : `{${p.name}}`}</code> — {typeText(doc, p.schema)}
                    {p.required ? "" : ", optional"}
                    {p.schema.default !== undefined && `, default ${JSON.stringify(p.schema.default)}`}
                    {p.description && `. ${p.description}`}
                  </li>
                ))}
              </ul>
            )}
            {body && (
              <div>
                <p className="text-sm font-bold">JSON body{resolve(doc, body).name ? ` (${resolve(doc, body).name})` : ""}</p>
                <Fields doc={doc} schema={body} />
              </div>
            )}
          </div>
        </details>
      )}
      <p className="mt-2 text-sm">
        Answers:{" "}
        {Object.entries(op.responses)
          .map(([status, r]) => `${status} ${r.description}`)
          .join(" · ")}
      </p>
    </li>
  );
}

export function ApiGuide({ intro }: { intro: ReactNode }) {
  const openApi = useOpenApi();
  if (openApi.isPending) return <Loading label="Loading the API description…" />;
  if (openApi.isError) return <QueryError error={openApi.error} what="the API description" onRetry={() => openApi.refetch()} />;
  const doc = openApi.data;
  const byTag = new Map<string, { method: string; path: string; op: OpenApiOperation }[]>();
  for (const [path, item] of Object.entries(doc.paths)) {
    for (const [method, op] of Object.entries(item)) {
      const tag = op.tags[0] ?? "Other";
      byTag.set(tag, [...(byTag.get(tag) ?? []), { method, path, op }]);
    }
  }
  return (
    <div className="space-y-8">
      <div className="max-w-3xl space-y-3">
        {intro}
        <p>
          The machine-readable description is <TextLink to="/api/v1/openapi.json" reloadDocument>/api/v1/openapi.json</TextLink> (OpenAPI {doc.openapi}); code generators and API tools read it
          directly.
        </p>
      </div>
      <nav aria-label="API sections">
        <ul className="flex flex-wrap gap-2 text-sm">
          {[...byTag.keys()].map((tag) => (
            <li key={tag}>
              <a className="font-bold text-indigo underline underline-offset-2" href={`#api-${tag.toLowerCase().replace(/\W+/g, "-")}`}>
                {tag}
              </a>
            </li>
          ))}
        </ul>
      </nav>
      {[...byTag.entries()].map(([tag, ops]) => (
        <section key={tag} aria-labelledby={`api-${tag.toLowerCase().replace(/\W+/g, "-")}`} className="space-y-3">
          <h2 id={`api-${tag.toLowerCase().replace(/\W+/g, "-")}`} className="text-xl font-bold">
            {tag}
          </h2>
          <ul className="space-y-3">
            {ops.map((o) => (
              <Operation key={`${o.method} ${o.path}`} doc={doc} {...o} />
            ))}
          </ul>
        </section>
      ))}
    </div>
  );
}
