import Link from "next/link";
import { FilterDisclosure } from "@/components/ui/filter-disclosure";

// The markup the activity log and the security log share: a plain GET filter form (so that the
// filters live in the address and a CSV link can carry them) and a list of events, one row each
// with its UTC time, a heading and the details.

export const filterInputCls = "mt-1 block min-h-11 w-full rounded-md border border-soot-200 bg-white px-2.5 py-2 text-sm";
const labelCls = "text-sm font-medium text-soot-700";

export type LogFilterFormProps = {
  label: string;
  clearHref: string;
  className: string;
  /** The filters in force, in words ("Record type: Build"), for the folded form's summary on a phone. */
  active: string[];
  children: React.ReactNode;
};

/** The filter form with its Filter and Clear buttons after the given fields, folded on a phone. */
export function LogFilterForm({ label, clearHref, className, active, children }: LogFilterFormProps) {
  return (
    <FilterDisclosure title="Filters" active={active}>
      <form method="get" className={`grid items-end gap-3 p-4 ${className}`} aria-label={label}>
      {children}
      <div className="flex items-end gap-2">
        <button type="submit" className="min-h-11 rounded-md bg-clay-600 px-3.5 py-2 text-sm font-semibold text-white hover:bg-clay-700">
          Filter
        </button>
        <Link href={clearHref} className="inline-flex min-h-11 items-center rounded-md border border-soot-200 px-3.5 py-2 text-sm font-semibold text-soot-700 hover:bg-soot-50">
          Clear
        </Link>
      </div>
      </form>
    </FilterDisclosure>
  );
}

/** The filled-in filters as "Label: value" for the folded form's summary. */
export function activeFilters(entries: [label: string, value: string | undefined | null][]): string[] {
  return entries.filter(([, v]) => v).map(([label, v]) => `${label}: ${v}`);
}

/** Who (part of a name or an e-mail address), and the UTC day range. */
export function PersonAndDaysFields({ user, from, to }: { user?: string; from?: string; to?: string }) {
  return (
    <>
      <label className={labelCls}>
        Person (name or e-mail)
        <input name="user" defaultValue={user ?? ""} className={filterInputCls} maxLength={120} />
      </label>
      <label className={labelCls}>
        From
        <input type="date" name="from" defaultValue={from ?? ""} className={filterInputCls} />
      </label>
      <label className={labelCls}>
        To
        <input type="date" name="to" defaultValue={to ?? ""} className={filterInputCls} />
      </label>
    </>
  );
}

/** A labelled select of `options` (value → label) with "Any" first. */
export function FilterSelect({ name, label, value, options }: { name: string; label: string; value?: string; options: Record<string, string> }) {
  return (
    <label className={labelCls}>
      {label}
      <select name={name} defaultValue={value ?? ""} className={filterInputCls}>
        <option value="">Any</option>
        {Object.entries(options).map(([k, text]) => (
          <option key={k} value={k}>
            {text}
          </option>
        ))}
      </select>
    </label>
  );
}

export function EventLogList({ testId, children }: { testId: string; children: React.ReactNode }) {
  return (
    <ol className="divide-y divide-soot-100 rounded-card border border-soot-200 bg-white" data-testid={testId}>
      {children}
    </ol>
  );
}

export type EventLogRowProps = {
  at: Date | string;
  heading: React.ReactNode;
  /** The middle column's width from the md breakpoint. */
  headingWidth: "10rem" | "12rem";
  data: Record<`data-${string}`, string>;
  children: React.ReactNode;
};

export function EventLogRow({ at, heading, headingWidth, data, children }: EventLogRowProps) {
  const iso = new Date(at).toISOString();
  return (
    <li className={`grid gap-1 px-4 py-3 text-sm ${headingWidth === "10rem" ? "md:grid-cols-[11rem_10rem_1fr]" : "md:grid-cols-[11rem_12rem_1fr]"}`} {...data}>
      <time className="tabular text-xs text-soot-600" dateTime={iso}>
        {iso.replace("T", " ").slice(0, 19)}
      </time>
      <div className="font-semibold text-soot-900">{heading}</div>
      <div className="min-w-0 text-soot-700 [overflow-wrap:anywhere]">{children}</div>
    </li>
  );
}
