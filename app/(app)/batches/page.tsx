import { PageHeader } from "@/components/ui/page-header";
import { NotLanded } from "@/components/ui/not-landed";

export const metadata = { title: "Batches" };

export default function Page() {
  return (
    <>
      <PageHeader title="Batches" lead="Fill wash batches and furnace runs with the units that are waiting." />
      <NotLanded what="The batching board" />
    </>
  );
}
