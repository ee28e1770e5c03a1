// The API reference drawn from the OpenAPI description (/api/openapi.json): one collapsible entry
// per operation, grouped by resource, with its permission, token scopes, parameters and body
// fields. Server-rendered: no script, so it works at any width, with the keyboard, and under the
// app's content security policy as it is.

type Schema = {
  type?: string | string[];
  anyOf?: Schema[];
  oneOf?: Schema[];
  enum?: unknown[];
  const?: unknown;
  format?: string;
  pattern?: string;
  minLength?: number;
  maxLength?: number;
  minimum?: number;
  maximum?: number;
  exclusiveMinimum?: number;
  exclusiveMaximum?: number;
  minItems?: number;
  maxItems?: number;
  default?: unknown;
  description?: string;
  properties?: Record<string, Schema>;
  required?: string[];
  items?: Schema;
  additionalProperties?: Schema | boolean;
};

type Parameter = { name: string; in: string; required?: boolean; schema?: Schema };
export type ReferenceOperation = {
  method: string;
  path: string;
  operationId: string;
  summary: string;
  description: string;
  permission: string;
  scopes: string[];
  parameters: Parameter[];
  body: Schema | null;
  bodyType: string | null;
  ok: string;
};
export type ReferenceTag = { name: string; operations: ReferenceOperation[] };

const METHOD_TONE: Record<string, string> = {
  GET: "bg-soot-100 text-soot-800",
  POST: "bg-verdigris-100 text-verdigris-700",
  PUT: "bg-brass-100 text-brass-600",
  PATCH: "bg-brass-100 text-brass-600",
  DELETE: "bg-clay-100 text-clay-800",
};

function typeOf(s: Schema): string {
  if (s.const !== undefined) return JSON.stringify(s.const);
  if (s.enum) return s.enum.map((v) => JSON.stringify(v)).join(" | ");
  const alts = s.anyOf ?? s.oneOf;
  if (alts) return alts.map(typeOf).join(" | ");
  const t = Array.isArray(s.type) ? s.type.join(" | ") : (s.type ?? "any");
  if (t === "array" && s.items) return `array of ${typeOf(s.items)}`;
  return s.format ? `${t} (${s.format})` : t;
}

function rules(s: Schema): string[] {
  const out: string[] = [];
  if (s.minLength !== undefined) out.push(`at least ${s.minLength} characters`);
  if (s.maxLength !== undefined) out.push(`at most ${s.maxLength} characters`);
  if (s.minimum !== undefined) out.push(`≥ ${s.minimum}`);
  if (s.exclusiveMinimum !== undefined) out.push(`> ${s.exclusiveMinimum}`);
  if (s.maximum !== undefined) out.push(`≤ ${s.maximum}`);
  if (s.exclusiveMaximum !== undefined) out.push(`< ${s.exclusiveMaximum}`);
  if (s.minItems !== undefined) out.push(`at least ${s.minItems} items`);
  if (s.maxItems !== undefined) out.push(`at most ${s.maxItems} items`);
  if (s.pattern) out.push(`matches ${s.pattern}`);
  if (s.default !== undefined) out.push(`default ${JSON.stringify(s.default)}`);
  return out;
}

function Fields({ schema, depth = 0 }: { schema: Schema; depth?: number }) {
  const alts = schema.oneOf ?? schema.anyOf;
  if (!schema.properties && alts?.some((a) => a.properties)) {
    return (
      <ol className="space-y-2">
        {alts.map((alt, i) => (
          <li key={i} className="rounded border border-soot-200 p-2">
            <p className="text-xs font-semibold text-soot-600">One of the forms ({i + 1})</p>
            <Fields schema={alt} depth={depth + 1} />
          </li>
        ))}
      </ol>
    );
  }
  const props = Object.entries(schema.properties ?? {});
  if (!props.length) return <p className="text-sm text-soot-600">{typeOf(schema)}</p>;
  const required = new Set(schema.required ?? []);
  return (
    <ul className="space-y-1.5">
      {props.map(([name, s]) => {
        const nested = s.properties ? s : s.items?.properties ? s.items : null;
        const notes = rules(s);
        return (
          <li key={name} className="text-sm">
            <code className="font-mono font-semibold text-soot-900">{name}</code>{" "}
            <span className="text-soot-600">{typeOf(s)}</span>
            {required.has(name) ? <span className="ml-1 text-xs font-semibold text-clay-800">required</span> : null}
            {notes.length ? <span className="block text-xs text-soot-600">{notes.join(" · ")}</span> : null}
            {s.description ? <span className="block text-xs text-soot-600">{s.description}</span> : null}
            {nested && depth < 4 ? (
              <div className="ml-3 mt-1 border-l border-soot-200 pl-3">
                <Fields schema={nested} depth={depth + 1} />
              </div>
            ) : null}
          </li>
        );
      })}
    </ul>
  );
}

function Operation({ op }: { op: ReferenceOperation }) {
  const path = op.parameters.filter((p) => p.in === "path");
  const query = op.parameters.filter((p) => p.in === "query");
  return (
    <details className="group rounded-md border border-soot-200 bg-white" id={op.operationId}>
      <summary className="flex min-h-11 cursor-pointer flex-wrap items-baseline gap-x-3 gap-y-1 px-3 py-2.5 focus-visible:outline focus-visible:outline-2 focus-visible:outline-clay-700">
        <span className={`inline-block min-w-16 rounded px-1.5 py-0.5 text-center font-mono text-xs font-semibold ${METHOD_TONE[op.method] ?? ""}`}>{op.method}</span>
        <code className="break-all font-mono text-sm text-soot-900">{op.path}</code>
        <span className="text-sm text-soot-600">{op.summary}</span>
      </summary>
      <div className="space-y-3 border-t border-soot-200 px-3 py-3 text-sm">
        <p className="whitespace-pre-line text-soot-700">{op.description}</p>
        <p className="text-xs text-soot-600">
          operationId <code className="font-mono">{op.operationId}</code> · answers {op.ok} ·{" "}
          {op.scopes.length ? `token scopes: ${op.scopes.join(", ")}` : op.permission === "public" || op.permission === "signed_in" ? "any caller allowed" : "people only, no token"}
        </p>
        {path.length || query.length ? (
          <div>
            <h4 className="font-semibold text-soot-800">Parameters</h4>
            <ul className="mt-1 space-y-1">
              {[...path, ...query].map((p) => (
                <li key={`${p.in}:${p.name}`}>
                  <code className="font-mono font-semibold">{p.name}</code> <span className="text-soot-600">in {p.in}, {p.schema ? typeOf(p.schema) : "string"}</span>
                  {p.required ? <span className="ml-1 text-xs font-semibold text-clay-800">required</span> : null}
                  {p.schema && rules(p.schema).length ? <span className="block text-xs text-soot-600">{rules(p.schema).join(" · ")}</span> : null}
                </li>
              ))}
            </ul>
          </div>
        ) : null}
        {op.body ? (
          <div>
            <h4 className="font-semibold text-soot-800">Body ({op.bodyType})</h4>
            <div className="mt-1">
              <Fields schema={op.body} />
            </div>
          </div>
        ) : null}
      </div>
    </details>
  );
}

export function ApiReference({ tags, webhooks }: { tags: ReferenceTag[]; webhooks: { type: string; summary: string }[] }) {
  return (
    <div className="space-y-8">
      <nav aria-label="Resources" className="flex flex-wrap gap-2">
        {tags.map((t) => (
          <a key={t.name} href={`#tag-${t.name}`} className="inline-flex min-h-11 items-center rounded border border-soot-200 bg-white px-3 text-sm text-soot-800 hover:border-clay-700">
            {t.name}
          </a>
        ))}
        <a href="#webhooks" className="inline-flex min-h-11 items-center rounded border border-soot-200 bg-white px-3 text-sm text-soot-800 hover:border-clay-700">
          webhooks
        </a>
      </nav>
      {tags.map((t) => (
        <section key={t.name} aria-labelledby={`tag-${t.name}`} className="space-y-2">
          <h2 id={`tag-${t.name}`} className="font-display text-lg font-semibold text-soot-900">
            {t.name}
          </h2>
          {t.operations.map((op) => (
            <Operation key={op.operationId} op={op} />
          ))}
        </section>
      ))}
      <section aria-labelledby="webhooks" className="space-y-2">
        <h2 id="webhooks" className="font-display text-lg font-semibold text-soot-900">
          Webhooks
        </h2>
        <p className="text-sm text-soot-700">
          Hearth POSTs each event as JSON to the endpoints subscribed to it, signed in the Hearth-Signature header:{" "}
          <code className="font-mono">t=&lt;unix seconds&gt;,v1=&lt;hex HMAC-SHA256(secret, &quot;&lt;t&gt;.&lt;raw body&gt;&quot;)&gt;</code>. Deduplicate on Hearth-Event-Id.
        </p>
        <ul className="space-y-1 text-sm">
          {webhooks.map((w) => (
            <li key={w.type}>
              <code className="font-mono font-semibold">{w.type}</code> <span className="text-soot-600">{w.summary}</span>
            </li>
          ))}
        </ul>
      </section>
    </div>
  );
}
