import { connection } from "next/server";
import { PageHeader } from "@/components/ui/page-header";
import { QuoteList } from "@/components/quotes/quote-list";
import { can } from "@/lib/auth/permissions";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Quotes" };

export default async function QuotesPage() {
  const user = await requirePageUser("quotes:read");
  await connection();
  return (
    <>
      <PageHeader title="Quotes" lead="What a customer's part will cost and when it can be had: the cost explained line by line, the date planned into the live schedule without booking anything." />
      <QuoteList canWrite={can(user.role, "quotes:write")} />
    </>
  );
}
