import { PageHeader } from "@/components/ui/page-header";
import { NotLanded } from "@/components/ui/not-landed";

export const metadata = { title: "Finishing" };

export default function Page() {
  return (
    <>
      <PageHeader title="Finishing" lead="What arrives when, with what stock on which faces." />
      <NotLanded what="The finishing queue" />
    </>
  );
}
