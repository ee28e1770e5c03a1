import { FloorBoard } from "@/components/floor/floor-board";
import { openingFetchScript } from "@/components/floor/opening-week";
import { QueryProvider } from "@/components/floor/query-provider";
import { PageHeader } from "@/components/ui/page-header";
import { can } from "@/lib/auth/permissions";
import { requirePageUser } from "@/app/_server/session";
import { headers } from "next/headers";
import { getDb } from "@/db/client";
import { findShopTimeZone } from "@/db/batches/reads";

export const metadata = { title: "Floor" };

export default async function FloorPage() {
  const user = await requirePageUser("shop:read");
  const timeZone = await findShopTimeZone(getDb());
  // The page's Content-Security-Policy admits inline scripts only with this request's nonce (proxy.ts).
  const nonce = (await headers()).get("x-nonce") ?? undefined;
  return (
    <>
      {/* Asks for the opening week while the page is still loading (components/floor/opening-week.ts). */}
      <script nonce={nonce} dangerouslySetInnerHTML={{ __html: openingFetchScript(timeZone) }} />
      <PageHeader
        title="Floor"
        lead={`Printers, wash stations and furnaces on one timeline. Drag an unscheduled build onto a printer, or move a booked one; booked wash batches and furnace runs move along their lanes the same way (their length is fixed by the wash or the profile). Times are the shop's, in ${timeZone.replaceAll("_", " ")}.`}
      />
      <QueryProvider>
        <FloorBoard timeZone={timeZone} canSchedule={can(user.role, "builds:schedule")} canPropose={can(user.role, "plan:propose")} canApply={can(user.role, "plan:apply")} canWash={can(user.role, "wash:write")} canFurnace={can(user.role, "furnace:write")} />
      </QueryProvider>
    </>
  );
}
