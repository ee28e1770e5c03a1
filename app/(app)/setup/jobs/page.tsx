import { PageHeader } from "@/components/ui/page-header";
import { requirePageUser } from "@/app/_server/session";
import { JobsBoard } from "./jobs-board";

export const metadata = { title: "Background jobs" };

export default async function JobsPage() {
  await requirePageUser("jobs:read");
  return (
    <>
      <PageHeader
        title="Background jobs"
        lead="What the worker has waiting, running and given up on, and when it last swept for bookings whose end passed without their job. Read-only: a failed job is fixed at its cause; the sweep then catches up by itself."
      />
      <div className="px-4 md:px-8 py-6">
        <JobsBoard />
      </div>
    </>
  );
}
