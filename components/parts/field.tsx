import type { FieldError } from "react-hook-form";

export type FieldProps = { label: string; error?: FieldError | { message?: string }; hint?: string; children: React.ReactNode; className?: string };

export const inputClass =
  "mt-1 block w-full rounded-md border border-soot-200 bg-white px-2.5 py-1.5 text-sm focus:border-clay-500 focus:outline-none aria-[invalid=true]:border-oxide-500";

/** A labelled form field with its error shown inline under it. */
export function Field({ label, error, hint, children, className = "" }: FieldProps) {
  return (
    <label className={`block text-xs font-medium text-soot-700 ${className}`}>
      {label}
      {children}
      {error?.message ? <span role="alert" className="mt-1 block text-2xs font-medium text-oxide-700">{error.message}</span> : hint ? <span className="mt-1 block text-2xs text-soot-500">{hint}</span> : null}
    </label>
  );
}

export type DialogProps = { title: string; onClose: () => void; children: React.ReactNode; wide?: boolean };

export function Dialog({ title, onClose, children, wide }: DialogProps) {
  return (
    <div className="fixed inset-0 z-50 flex items-start justify-center overflow-y-auto bg-soot-950/40 p-6" onKeyDown={(e) => e.key === "Escape" && onClose()}>
      <div role="dialog" aria-modal="true" aria-label={title} className={`w-full ${wide ? "max-w-5xl" : "max-w-2xl"} rounded-card bg-white p-5 shadow-card`}>
        <div className="mb-3 flex items-center justify-between">
          <h2 className="font-display text-lg font-semibold text-soot-900">{title}</h2>
          <button type="button" onClick={onClose} className="rounded px-2 py-1 text-sm text-soot-500 hover:bg-soot-100" aria-label="Close">
            Close
          </button>
        </div>
        {children}
      </div>
    </div>
  );
}
