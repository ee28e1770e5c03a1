import { PageHeader } from "@/components/ui/page-header";
import { NotLanded } from "@/components/ui/not-landed";

export const metadata = { title: "Capacity" };

export default function Page() {
  return (
    <>
      <PageHeader title="Capacity" lead="Utilization, work in progress and the orders at risk." />
      <NotLanded what="The capacity view" />
    </>
  );
}
