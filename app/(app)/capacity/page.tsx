import { CapacityBoard } from "@/components/capacity/capacity-board";
import { PageHeader } from "@/components/ui/page-header";
import { QuoteLearning } from "@/components/quotes/quote-learning";
import { getDb } from "@/db/client";
import { loadShopClock } from "@/db/capacity/reads";
import { defaultRange } from "@/lib/capacity/summary";
import { formatLocalDate, localDateOf } from "@/lib/process/time-zone";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Capacity" };

export default async function CapacityPage() {
  await requirePageUser("capacity:read");
  const clock = await loadShopClock(getDb());
  const now = new Date();
  return (
    <>
      <PageHeader title="Capacity" lead="Can the shop keep its promises? Late and at-risk orders, how busy each printer, wash station and furnace is, what is booked ahead and what came out." />
      <div className="px-4 md:px-8 py-6">
        <CapacityBoard initialRange={defaultRange(now, clock.time_zone)} today={formatLocalDate(localDateOf(now.getTime(), clock.time_zone))} />
        <div className="mt-6">
          <QuoteLearning />
        </div>
      </div>
    </>
  );
}
