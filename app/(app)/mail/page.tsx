import { PageHeader } from "@/components/ui/page-header";
import { NotLanded } from "@/components/ui/not-landed";

export const metadata = { title: "Mail" };

export default function Page() {
  return (
    <>
      <PageHeader title="Mail" lead="Messages captured by the local mail server." />
      <NotLanded what="The mail viewer" />
    </>
  );
}
