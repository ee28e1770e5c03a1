import Link from "next/link";
import { connection } from "next/server";
import { PageHeader } from "@/components/ui/page-header";
import { QueryProvider } from "@/components/floor/query-provider";
import { QuoteEditor } from "@/components/quotes/quote-editor";
import { can } from "@/lib/auth/permissions";
import { getEnv } from "@/lib/env";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Quote" };

export default async function QuotePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser("quotes:read");
  await connection();
  const { id } = await params;
  return (
    <>
      <PageHeader title="Quote" lead="Lines, cost figures with their formulas, and the tentative plan with its critical path." actions={<Link href="/quotes" className="tap-target inline-flex items-center text-sm text-clay-800 underline">All quotes</Link>} />
      <QueryProvider>
        <QuoteEditor id={id} canWrite={can(user.role, "quotes:write")} maxUploadBytes={getEnv().UPLOAD_MAX_BYTES} />
      </QueryProvider>
    </>
  );
}
