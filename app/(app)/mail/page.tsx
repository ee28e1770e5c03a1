import { PageHeader } from "@/components/ui/page-header";
import { requirePageUser } from "@/app/_server/session";
import { MailViewer } from "./mail-viewer";

export const metadata = { title: "Mail" };

export default async function MailPage() {
  await requirePageUser("mail:read");
  return (
    <>
      <PageHeader
        title="Mail"
        lead="Every message Hearth has sent through the local capture server, newest first, and the outbox behind them: a message waits there, pending, while the mail relay is down."
      />
      <div className="px-4 md:px-8 py-6">
        <MailViewer />
      </div>
    </>
  );
}
