"use client";

import { useRouter } from "next/navigation";
import { useId, useState } from "react";
import { ApiError, sendFile } from "@/lib/http/client";
import { secondary } from "./format";

export type CertificatePanelProps = {
  lot: { id: string; code: string; version: number };
  certificate: { filename: string; content_type: string; size_bytes: number; uploaded_at: string } | null;
  canWrite: boolean;
};

const size = (bytes: number) => (bytes >= 1024 * 1024 ? `${(bytes / 1024 / 1024).toFixed(1)} MB` : `${Math.max(1, Math.round(bytes / 1024))} kB`);

/** The supplier's certificate of analysis: open it, or attach (replace) it as a PDF or a photo. */
export function CertificatePanel({ lot, certificate, canWrite }: CertificatePanelProps) {
  const router = useRouter();
  const inputId = useId();
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function upload(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const file = new FormData(e.currentTarget).get("file");
    if (!(file instanceof File) || !file.size) {
      setMessage("Choose the certificate file first.");
      return;
    }
    setBusy(true);
    setMessage(`Uploading ${file.name}…`);
    try {
      await sendFile(`/api/inventory/lots/${lot.id}/certificate?version=${lot.version}`, file);
      setMessage(`${file.name} is attached to ${lot.code}.`);
      router.refresh();
    } catch (err) {
      setMessage(err instanceof ApiError && err.status === 409 ? `${err.message} Your file was not stored; choose it again after reloading.` : err instanceof Error ? err.message : String(err));
    } finally {
      setBusy(false);
    }
  }

  return (
    <section aria-labelledby="certificate-heading" className="rounded-card bg-white p-4 shadow-card md:p-5">
      <h2 id="certificate-heading" className="font-display text-lg font-semibold">Certificate of analysis</h2>
      {certificate ? (
        <p className="mt-1 text-sm">
          <a className="inline-block min-h-11 py-2 font-semibold text-clay-800 underline" href={`/api/inventory/lots/${lot.id}/certificate`} target="_blank" rel="noopener">
            {certificate.filename}
          </a>{" "}
          <span className="text-soot-700">({certificate.content_type === "application/pdf" ? "PDF" : "photo"}, {size(certificate.size_bytes)}, attached {certificate.uploaded_at})</span>
        </p>
      ) : (
        <p className="mt-1 text-sm text-soot-700">None attached yet.</p>
      )}
      {canWrite ? (
        <form onSubmit={upload} className="mt-2 flex flex-wrap items-end gap-2">
          <label htmlFor={inputId} className="text-sm">
            {certificate ? "Replace with" : "Attach"} the supplier&apos;s certificate (PDF, JPEG, PNG or WebP, up to 15 MB)
            <input id={inputId} name="file" type="file" accept="application/pdf,image/jpeg,image/png,image/webp" className="mt-1 block w-full text-sm file:mr-3 file:min-h-11 file:rounded-md file:border file:border-clay-300 file:bg-white file:px-3 file:text-sm file:font-semibold file:text-clay-800" />
          </label>
          <button type="submit" className={secondary} disabled={busy}>Upload certificate</button>
        </form>
      ) : null}
      <p role="status" aria-live="polite" className="mt-2 text-sm text-soot-800">{message}</p>
    </section>
  );
}
