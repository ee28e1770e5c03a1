"use client";

export default function ErrorPage({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div className="px-4 md:px-8 py-10">
      <div role="alert" className="rounded-card border border-oxide-500/40 bg-oxide-100 px-5 py-4 text-sm text-oxide-700">
        <div className="font-semibold">This page could not be shown.</div>
        <p className="mt-1">Nothing was changed. Try again; if it keeps happening, tell an admin the reference {error.digest ?? "(none)"}.</p>
        <button type="button" onClick={reset} className="mt-3 rounded-md bg-oxide-700 px-3 py-1.5 text-xs font-semibold text-white">
          Try again
        </button>
      </div>
    </div>
  );
}
