"use client";

import { useQuery } from "@tanstack/react-query";
import { useEffect, useRef, useState } from "react";
import { apiJson } from "@/components/floor/api";

type FileInfo = { id: string; filename: string; status: "queued" | "analysing" | "done" | "failed"; error: string | null; analysis: unknown };

export type GeometryUploadProps = {
  partId?: string;
  /** Where the file goes; a part's geometry by default. */
  uploadUrl?: string;
  /** Told the stored file's id as soon as the upload is accepted. */
  onFile?: (id: string) => void;
  maxBytes: number;
  /** The part's current file, if any; its status is followed until the worker is done. */
  current: { id: string; status: string } | null;
  onAnalysed: () => void;
};

const STEPS = ["queued", "analysing", "done"] as const;

/** Upload with a progress bar (XMLHttpRequest reports upload progress; fetch does not). */
export function GeometryUpload({ partId, uploadUrl, onFile, maxBytes, current, onAnalysed }: GeometryUploadProps) {
  const [progress, setProgress] = useState<number | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [fileId, setFileId] = useState<string | null>(current && (current.status === "queued" || current.status === "analysing") ? current.id : null);
  const xhr = useRef<XMLHttpRequest | null>(null);

  const status = useQuery({
    queryKey: ["file", fileId],
    queryFn: ({ signal }) => apiJson<{ file: FileInfo }>(`/api/files/${fileId}`, { signal }),
    enabled: fileId !== null,
    refetchInterval: (q) => (q.state.data && (q.state.data.file.status === "done" || q.state.data.file.status === "failed") ? false : 800),
  });
  const state = status.data?.file.status;
  const told = useRef<string | null>(null);
  useEffect(() => {
    if ((state === "done" || state === "failed") && told.current !== fileId) {
      told.current = fileId;
      onAnalysed();
    }
  }, [state, fileId, onAnalysed]);

  function upload(file: File) {
    setError(null);
    if (!/\.stl$/i.test(file.name)) {
      setError(`${file.name} is not an STL file; choose a .stl file.`);
      return;
    }
    if (file.size > maxBytes) {
      setError(`${file.name} is ${(file.size / 1048576).toFixed(1)} MB; the limit is ${Math.round(maxBytes / 1048576)} MB.`);
      return;
    }
    const req = new XMLHttpRequest();
    xhr.current = req;
    req.open("POST", uploadUrl ?? `/api/parts/${partId}/geometry`);
    req.setRequestHeader("content-type", "application/octet-stream");
    req.setRequestHeader("x-filename", encodeURIComponent(file.name));
    req.upload.onprogress = (e) => {
      if (e.lengthComputable) setProgress(Math.round((e.loaded / e.total) * 100));
    };
    req.onload = () => {
      setProgress(null);
      let body: { file?: { id: string }; error?: { message: string } } = {};
      try {
        body = JSON.parse(req.responseText);
      } catch {
        /* not JSON */
      }
      if (req.status === 201 && body.file) {
        setFileId(body.file.id);
        onFile?.(body.file.id);
        return;
      }
      setError(body.error?.message ?? `The upload was refused (${req.status}).`);
    };
    req.onerror = () => {
      setProgress(null);
      setError("The upload did not reach the server; nothing was stored.");
    };
    req.onabort = () => {
      setProgress(null);
      setError("Upload cancelled; nothing was stored.");
    };
    setProgress(0);
    req.send(file);
  }

  return (
    <div className="space-y-2" data-testid="geometry-upload">
      <div className="flex flex-wrap items-center gap-3">
        <label className="rounded-md bg-clay-600 px-3 py-1.5 text-sm font-semibold text-white hover:bg-clay-700">
          {current ? "Replace STL" : "Upload STL"}
          <input type="file" accept=".stl,model/stl,application/sla" className="sr-only" data-testid="stl-file" onChange={(e) => { const f = e.target.files?.[0]; if (f) upload(f); e.target.value = ""; }} />
        </label>
        <span className="text-2xs text-soot-500">Binary or ASCII STL in millimetres, up to {Math.round(maxBytes / 1048576)} MB.</span>
      </div>
      {progress !== null ? (
        <div className="flex items-center gap-2">
          <div className="h-2 flex-1 overflow-hidden rounded-full bg-soot-100" role="progressbar" aria-label="Upload progress" aria-valuemin={0} aria-valuemax={100} aria-valuenow={progress}>
            <div className="h-full bg-clay-500 transition-[width]" style={{ width: `${progress}%` }} />
          </div>
          <span className="tabular text-xs text-soot-600">{progress} %</span>
          <button type="button" onClick={() => xhr.current?.abort()} className="text-xs text-soot-600 underline">Cancel</button>
        </div>
      ) : null}
      {fileId && state ? (
        <ol className="flex items-center gap-2 text-xs" aria-label="Analysis" data-testid="analysis-status" data-status={state}>
          {state === "failed" ? (
            <li className="font-semibold text-oxide-700">failed: {status.data?.file.error}</li>
          ) : (
            STEPS.map((s, i) => {
              const reached = STEPS.indexOf(state as (typeof STEPS)[number]) >= i;
              return (
                <li key={s} className={`flex items-center gap-1 ${reached ? "font-semibold text-verdigris-700" : "text-soot-500"}`}>
                  <span className={`inline-block h-2 w-2 rounded-full ${reached ? "bg-verdigris-500" : "bg-soot-300"}`} />
                  {s}
                  {i < STEPS.length - 1 ? <span className="text-soot-300">→</span> : null}
                </li>
              );
            })
          )}
        </ol>
      ) : null}
      {error ? <p role="alert" className="rounded-md bg-oxide-100 px-3 py-2 text-sm text-oxide-700" data-testid="upload-error">{error}</p> : null}
    </div>
  );
}
