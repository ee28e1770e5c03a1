import Link from "next/link";
import { connection } from "next/server";
import { getDb } from "@/db/client";
import { listWebhookDeliveries, listWebhookEndpoints } from "@/db/webhooks/reads";
import { PageHeader } from "@/components/ui/page-header";
import { WebhooksAdmin } from "@/components/integrations/webhooks-admin";
import { requirePageUser } from "@/app/_server/session";
import { WEBHOOK_EVENT_TYPES } from "@/lib/integrations/webhook-signature";

export const metadata = { title: "Webhooks" };

export default async function WebhooksPage() {
  await requirePageUser("setup:write");
  await connection();
  const db = getDb();
  const [endpoints, deliveries] = await Promise.all([listWebhookEndpoints(db), listWebhookDeliveries(db, { limit: 50 })]);
  return (
    <>
      <PageHeader
        title="Webhooks"
        lead="Hearth tells other programs when orders, builds, furnace runs, units and inspections change: a signed POST to each endpoint, sent by the worker and retried with growing waits until it answers."
        actions={
          <Link href="/setup" className="inline-flex min-h-11 items-center text-sm font-semibold text-clay-700 hover:underline">
            ← Set-up
          </Link>
        }
      />
      <div className="px-4 py-6 sm:px-8">
        <WebhooksAdmin endpoints={endpoints} deliveries={deliveries} eventTypes={[...WEBHOOK_EVENT_TYPES]} />
      </div>
    </>
  );
}
