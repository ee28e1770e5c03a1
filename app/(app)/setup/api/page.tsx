import Link from "next/link";
import { PageHeader } from "@/components/ui/page-header";
import { ApiReference, type ReferenceOperation, type ReferenceTag } from "@/components/integrations/api-reference";
import { requirePageUser } from "@/app/_server/session";
import { openApiDocument } from "@/lib/api/openapi";
import { getEnv } from "@/lib/env";

export const metadata = { title: "API reference" };

type Op = {
  operationId: string;
  tags: string[];
  summary: string;
  description: string;
  "x-hearth-permission": string;
  "x-hearth-scopes": string[];
  parameters?: ReferenceOperation["parameters"];
  requestBody?: { content: Record<string, { schema: ReferenceOperation["body"] }> };
  responses: Record<string, unknown>;
};

/** The reference drawn from the same description /api/openapi.json serves. */
function referenceOf(doc: ReturnType<typeof openApiDocument>) {
  const byTag = new Map<string, ReferenceOperation[]>();
  for (const [path, item] of Object.entries(doc.paths as Record<string, Record<string, Op>>)) {
    for (const [method, op] of Object.entries(item)) {
      const [type, media] = Object.entries(op.requestBody?.content ?? {})[0] ?? [null, null];
      const list = byTag.get(op.tags[0]) ?? [];
      list.push({
        method: method.toUpperCase(), path, operationId: op.operationId, summary: op.summary, description: op.description,
        permission: op["x-hearth-permission"], scopes: op["x-hearth-scopes"], parameters: op.parameters ?? [],
        body: media?.schema ?? null, bodyType: type, ok: Object.keys(op.responses).find((c) => c.startsWith("2")) ?? "200",
      });
      byTag.set(op.tags[0], list);
    }
  }
  const tags: ReferenceTag[] = [...byTag].sort(([a], [b]) => a.localeCompare(b)).map(([name, operations]) => ({ name, operations }));
  const webhooks = Object.entries(doc.webhooks as Record<string, { post: { summary: string } }>).map(([type, w]) => ({ type, summary: w.post.summary.replace(/^[^:]*:\s*/, "") }));
  return { tags, webhooks };
}

export default async function ApiReferencePage() {
  await requirePageUser("users:admin");
  const { tags, webhooks } = referenceOf(openApiDocument({ serverUrl: getEnv().APP_URL }));
  return (
    <>
      <PageHeader
        title="API reference"
        lead="Every route other programs can call with a token from API tokens, the permission and token scopes each needs, and the fields it takes; the same description as /api/openapi.json (OpenAPI 3.1), which code generators read."
        actions={
          <>
            <a href="/api/openapi.json" className="inline-flex min-h-11 items-center text-sm font-semibold text-clay-700 hover:underline">
              openapi.json
            </a>
            <Link href="/setup" className="inline-flex min-h-11 items-center text-sm font-semibold text-clay-700 hover:underline">
              ← Set-up
            </Link>
          </>
        }
      />
      <div className="px-4 py-6 sm:px-8">
        <ApiReference tags={tags} webhooks={webhooks} />
      </div>
    </>
  );
}
