"use client";

import Link from "next/link";
import { useState } from "react";
import { ApiError, sendJson } from "@/lib/http/client";
import type { NextStep, StepAction } from "@/lib/scan/next-step";

export type NextStepCardProps = { title: string; subtitle?: React.ReactNode; step: NextStep; onDone?: () => void };

const big = "flex min-h-14 w-full items-center justify-center rounded-card px-4 text-center text-lg font-semibold";
const small = "inline-flex min-h-11 items-center rounded-md border border-soot-300 bg-white px-3 text-sm font-semibold text-soot-800 hover:bg-soot-50";

/** What it is, where it is, and the one thing to do next, large enough to hit with a gloved thumb. */
export function NextStepCard({ title, subtitle, step, onDone }: NextStepCardProps) {
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<{ tone: "success" | "danger"; text: string } | null>(null);

  async function run(a: Extract<StepAction, { kind: "post" }>) {
    setBusy(true);
    setMessage(null);
    try {
      await sendJson(a.url, "POST", a.body);
      setMessage({ tone: "success", text: a.done });
    } catch (err) {
      const conflict = err instanceof ApiError && err.status === 409;
      setMessage({ tone: "danger", text: err instanceof ApiError ? `${err.message}${conflict ? " The page has been reloaded." : ""}` : "The server could not be reached; nothing was changed." });
    } finally {
      setBusy(false);
      onDone?.();
    }
  }

  const render = (a: StepAction, primary: boolean) =>
    a.kind === "link" ? (
      <Link key={a.label} href={a.href} className={primary ? `${big} bg-clay-600 text-white hover:bg-clay-700` : small} data-testid={primary ? "next-step" : undefined}>
        {a.label}
      </Link>
    ) : (
      <button key={a.label} type="button" disabled={busy} onClick={() => run(a)} className={primary ? `${big} bg-clay-600 text-white hover:bg-clay-700 disabled:opacity-60` : small} data-testid={primary ? "next-step" : undefined}>
        {busy && primary ? "Working…" : a.label}
      </button>
    );

  return (
    <section aria-label="Next step" className="rounded-card border border-soot-200 bg-white p-4 shadow-card" data-testid="next-step-card">
      <div className="font-mono text-xl font-semibold text-soot-900">{title}</div>
      {subtitle ? <div className="mt-0.5 text-sm text-soot-700">{subtitle}</div> : null}
      <p className="mt-2 text-base font-semibold text-soot-900" data-testid="where">
        {step.where}
      </p>
      {step.primary ? <div className="mt-3">{render(step.primary, true)}</div> : null}
      {step.note ? <p className="mt-2 text-sm text-soot-700">{step.note}</p> : null}
      {step.secondary.length ? <div className="mt-3 flex flex-wrap gap-2">{step.secondary.map((a) => render(a, false))}</div> : null}
      {message ? (
        <p role={message.tone === "danger" ? "alert" : "status"} className={`mt-3 rounded-md px-3 py-2 text-sm ${message.tone === "danger" ? "bg-oxide-100 text-oxide-700" : "bg-verdigris-100 text-verdigris-700"}`} data-testid="next-step-message">
          {message.text}
        </p>
      ) : null}
    </section>
  );
}
