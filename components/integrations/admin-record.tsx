// The row the API-token and webhook admin screens share: a card with the record's name and state
// on the left, its buttons on the right (wrapping under it on a phone), and its details below.

/** A moment in the reader's locale, or a dash. */
export const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString(undefined, { dateStyle: "medium", timeStyle: "short" }) : "—");

export type AdminRecordRowProps = { title: React.ReactNode; actions?: React.ReactNode; testId?: string; children: React.ReactNode };

export function AdminRecordRow({ title, actions, testId, children }: AdminRecordRowProps) {
  return (
    <li className="rounded-card bg-white p-4 shadow-card" data-testid={testId}>
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <div className="min-w-0">{title}</div>
        {actions ? <div className="flex flex-wrap gap-2">{actions}</div> : null}
      </div>
      {children}
    </li>
  );
}

const TONES = {
  plain: "border-soot-200 text-soot-800 hover:bg-soot-50",
  danger: "border-oxide-500/40 text-oxide-700 hover:bg-oxide-100",
} as const;

export function RowButton({ tone = "plain", onClick, children }: { tone?: keyof typeof TONES; onClick: () => void; children: React.ReactNode }) {
  return (
    <button type="button" onClick={onClick} className={`min-h-11 rounded-md border px-3 text-sm font-semibold ${TONES[tone]}`}>
      {children}
    </button>
  );
}
