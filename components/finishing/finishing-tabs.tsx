import Link from "next/link";

// The finishing area has two views: the queue and the shrinkage calibration it feeds.

export function FinishingTabs({ active }: { active: "queue" | "calibration" }) {
  const tab = (href: string, key: typeof active, label: string) => (
    <Link
      href={href}
      aria-current={active === key ? "page" : undefined}
      className={`rounded-t-md border-b-2 px-3 py-2 text-sm font-semibold ${active === key ? "border-clay-500 text-soot-900" : "border-transparent text-soot-500 hover:text-soot-800"}`}
    >
      {label}
    </Link>
  );
  return (
    <nav aria-label="Finishing" className="flex gap-1 border-b border-soot-200 bg-white px-4 md:px-8">
      {tab("/finishing", "queue", "Queue")}
      {tab("/finishing/calibration", "calibration", "Calibration")}
    </nav>
  );
}
