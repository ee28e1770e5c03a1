import { connection } from "next/server";
import { PageHeader } from "@/components/ui/page-header";
import { QuoteSettingsForm } from "@/components/quotes/quote-settings-form";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Quoting rates" };

export default async function QuoteSettingsPage() {
  await requirePageUser("setup:write");
  await connection();
  return (
    <>
      <PageHeader title="Quoting rates" lead="What an hour of each machine and of finishing costs, what a furnace run and a wash batch cost, overhead and margin, and each feedstock's price." />
      <QuoteSettingsForm />
    </>
  );
}
