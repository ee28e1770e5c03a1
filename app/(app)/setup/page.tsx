import { PageHeader } from "@/components/ui/page-header";
import { NotLanded } from "@/components/ui/not-landed";

export const metadata = { title: "Set-up" };

export default function Page() {
  return (
    <>
      <PageHeader title="Set-up" lead="Users, equipment, materials, sinter profiles and shop settings." />
      <NotLanded what="Shop set-up" />
    </>
  );
}
