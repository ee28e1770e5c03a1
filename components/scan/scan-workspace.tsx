"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { ApiError, getJson } from "@/lib/http/client";
import type { ScanHit } from "@/lib/scan/codes";
import { Camera } from "./camera";
import { CodeForm } from "./code-form";

const KIND_WORD: Record<ScanHit["kind"], string> = { unit: "Unit", build: "Build", wash_batch: "Wash batch", furnace_run: "Furnace run" };

export async function lookUp(text: string): Promise<ScanHit[]> {
  return (await getJson<{ hits: ScanHit[] }>(`/api/scan?code=${encodeURIComponent(text)}`)).hits;
}

/** Scan or type a code and open what it names. */
export function ScanWorkspace() {
  const router = useRouter();
  const [message, setMessage] = useState<{ tone: "danger" | "info"; text: string } | null>(null);
  const [choices, setChoices] = useState<ScanHit[]>([]);
  const [busy, setBusy] = useState(false);

  async function open(text: string) {
    setBusy(true);
    setMessage(null);
    setChoices([]);
    try {
      const hits = await lookUp(text);
      if (hits.length === 1) {
        setMessage({ tone: "info", text: `Opening ${KIND_WORD[hits[0].kind].toLowerCase()} ${hits[0].code}…` });
        router.push(hits[0].href);
        return;
      }
      setChoices(hits);
    } catch (err) {
      setMessage({ tone: "danger", text: err instanceof ApiError ? err.message : "The server could not be reached." });
    } finally {
      setBusy(false);
    }
  }

  return (
    <div className="mx-auto max-w-xl space-y-4">
      <Camera onCode={open} paused={busy} />
      <CodeForm onCode={open} busy={busy} label="Or type the code from the traveler" hint="A unit serial, or a build, wash batch or furnace run code." />
      {message ? (
        <p role={message.tone === "danger" ? "alert" : "status"} className={`rounded-md px-3 py-2 text-sm ${message.tone === "danger" ? "bg-oxide-100 text-oxide-700" : "bg-slate2-100 text-soot-900"}`} data-testid="scan-message">
          {message.text}
        </p>
      ) : null}
      {choices.length ? (
        <ul className="space-y-2" aria-label="Records with this code">
          {choices.map((h) => (
            <li key={`${h.kind}:${h.id}`}>
              <a href={h.href} className="flex min-h-11 items-center justify-between rounded-md border border-soot-200 bg-white px-3 text-sm font-semibold text-soot-900 hover:bg-soot-50">
                {KIND_WORD[h.kind]} {h.code} <span className="font-normal text-soot-600">{h.state.replaceAll("_", " ")}</span>
              </a>
            </li>
          ))}
        </ul>
      ) : null}
    </div>
  );
}
