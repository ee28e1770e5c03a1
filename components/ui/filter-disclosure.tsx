"use client";

import { useId, useState } from "react";

// On a phone a log's filter form would fill the screen before the first event: it folds behind a
// button that says which filters are in force, closed until asked for. From the sm breakpoint up
// the form is always shown and the button is not (the CSS decides, so there is no flash while the
// page hydrates).

export function FilterDisclosure({ title, active, children }: { title: string; active: string[]; children: React.ReactNode }) {
  const [open, setOpen] = useState(false);
  const id = useId();
  return (
    <div className="rounded-card border border-soot-200 bg-white" data-testid="log-filters">
      <button
        type="button"
        aria-expanded={open}
        aria-controls={id}
        onClick={() => setOpen((o) => !o)}
        className="flex min-h-11 w-full items-center gap-2 rounded-card px-4 py-2.5 text-left text-sm sm:hidden"
      >
        <span className="shrink-0 font-semibold text-soot-900">
          {title}
          {active.length ? ` (${active.length})` : ""}
        </span>
        <span className="min-w-0 flex-1 text-soot-600 [overflow-wrap:anywhere]" data-testid="log-filters-summary">
          {active.length ? active.join(" · ") : "none: every event"}
        </span>
        <svg aria-hidden="true" viewBox="0 0 20 20" className={`size-5 shrink-0 text-soot-600 transition-transform ${open ? "rotate-180" : ""}`}>
          <path d="M5 7.5l5 5 5-5" fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" strokeLinejoin="round" />
        </svg>
      </button>
      <div id={id} className={open ? "block border-t border-soot-100 sm:border-t-0" : "hidden sm:block"}>
        {children}
      </div>
    </div>
  );
}
