import { PageHeader } from "@/components/ui/page-header";
import { NotLanded } from "@/components/ui/not-landed";

export const metadata = { title: "Orders & parts" };

export default function Page() {
  return (
    <>
      <PageHeader title="Orders & parts" lead="Turn orders into parts and units, upload geometry, check the scale-up." />
      <NotLanded what="Order and part management" />
    </>
  );
}
