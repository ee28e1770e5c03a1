import { PageHeader } from "@/components/ui/page-header";
import { NotLanded } from "@/components/ui/not-landed";

export default async function BuildPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  return (
    <>
      <PageHeader title="Build" lead={`Build ${id}: plate, scale-up, estimates, traveler.`} />
      <NotLanded what="The build page" />
    </>
  );
}
