import Link from "next/link";
import { connection } from "next/server";
import { getDb } from "@/db/client";
import { listApiTokens } from "@/db/api-tokens/reads";
import { PageHeader } from "@/components/ui/page-header";
import { ApiTokensAdmin } from "@/components/integrations/api-tokens-admin";
import { requirePageUser } from "@/app/_server/session";
import { API_SCOPES, API_SCOPE_NAMES } from "@/lib/auth/api-scopes";

export const metadata = { title: "API tokens" };

export default async function ApiTokensPage() {
  await requirePageUser("users:admin");
  await connection();
  const tokens = await listApiTokens(getDb());
  const scopes = API_SCOPE_NAMES.map((name) => ({ name, label: API_SCOPES[name].label, hint: API_SCOPES[name].hint }));
  return (
    <>
      <PageHeader
        title="API tokens"
        lead="Tokens let another program (ordering, accounting, shipping, quality) call Hearth's API. A token may do what its scopes allow and your role allows, no more."
        actions={
          <Link href="/setup" className="inline-flex min-h-11 items-center text-sm font-semibold text-clay-700 hover:underline">
            ← Set-up
          </Link>
        }
      />
      <div className="px-4 py-6 sm:px-8">
        <ApiTokensAdmin tokens={tokens} scopes={scopes} />
      </div>
    </>
  );
}
