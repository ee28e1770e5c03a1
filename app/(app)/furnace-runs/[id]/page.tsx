import { PageHeader } from "@/components/ui/page-header";
import { NotLanded } from "@/components/ui/not-landed";

export default async function FurnaceRunPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  return (
    <>
      <PageHeader title="Furnace run" lead={`Run ${id}: profile, trays, loading and unloading.`} />
      <NotLanded what="The furnace run page" />
    </>
  );
}
