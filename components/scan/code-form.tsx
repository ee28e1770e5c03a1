"use client";

import { useId, useState } from "react";

export type CodeFormProps = { onCode: (text: string) => void | Promise<void>; busy?: boolean; label: string; hint: string; button?: string };

/** Typed entry: the fallback when there is no camera, and the quickest path with a hand scanner that types. */
export function CodeForm({ onCode, busy, label, hint, button = "Open" }: CodeFormProps) {
  const [value, setValue] = useState("");
  const id = useId();
  return (
    <form
      className="rounded-card border border-soot-200 bg-white p-3 shadow-card"
      onSubmit={async (e) => {
        e.preventDefault();
        const text = value.trim();
        if (!text) return;
        await onCode(text);
        setValue("");
      }}
    >
      <label htmlFor={id} className="block text-sm font-semibold text-soot-800">
        {label}
      </label>
      <p id={`${id}-hint`} className="text-xs text-soot-600">
        {hint}
      </p>
      <div className="mt-2 flex gap-2">
        <input
          id={id}
          aria-describedby={`${id}-hint`}
          value={value}
          onChange={(e) => setValue(e.target.value)}
          autoCapitalize="characters"
          autoComplete="off"
          spellCheck={false}
          enterKeyHint="go"
          className="min-h-11 min-w-0 flex-1 rounded-md border border-soot-300 px-3 font-mono text-base uppercase focus:border-clay-500 focus:outline-none"
          data-testid="code-input"
        />
        <button type="submit" disabled={busy || !value.trim()} className="min-h-11 shrink-0 rounded-md bg-clay-600 px-4 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-60">
          {button}
        </button>
      </div>
    </form>
  );
}
