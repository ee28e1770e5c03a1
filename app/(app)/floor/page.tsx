import { PageHeader } from "@/components/ui/page-header";
import { NotLanded } from "@/components/ui/not-landed";

export const metadata = { title: "Floor" };

export default function Page() {
  return (
    <>
      <PageHeader title="Floor" lead="Printers, wash stations and furnaces as lanes; drag builds to schedule them." />
      <NotLanded what="The scheduling timeline" />
    </>
  );
}
