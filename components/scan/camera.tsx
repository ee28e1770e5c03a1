"use client";

import jsQR from "jsqr";
import { useEffect, useRef, useState } from "react";

export type CameraProps = { onCode: (text: string) => void; paused?: boolean };

type CameraState = { kind: "idle" } | { kind: "starting" } | { kind: "live" } | { kind: "refused"; text: string };

/** Why a camera cannot start, in words a person at the machine can act on. */
function cameraProblem(err: unknown): string {
  const name = (err as { name?: string } | null)?.name;
  if (name === "NotAllowedError" || name === "SecurityError") return "The camera was refused. Allow it for this site in the browser's settings, or type the code below.";
  if (name === "NotFoundError" || name === "OverconstrainedError") return "This device has no camera Hearth can use. Type the code below.";
  if (name === "NotReadableError") return "The camera is busy in another app. Close it, or type the code below.";
  return "The camera could not be started. Type the code below.";
}

/**
 * The phone's rear camera, decoded with jsQR a few times a second. Browsers only offer the
 * camera to secure pages (https, or this machine's own address): on plain http from another
 * host getUserMedia does not exist, and the page says so instead of failing silently.
 */
export function Camera({ onCode, paused }: CameraProps) {
  const video = useRef<HTMLVideoElement>(null);
  const canvas = useRef<HTMLCanvasElement>(null);
  const stream = useRef<MediaStream | null>(null);
  const [state, setState] = useState<CameraState>({ kind: "idle" });
  const last = useRef<{ text: string; at: number }>({ text: "", at: 0 });
  const onCodeRef = useRef(onCode);
  const pausedRef = useRef(paused);
  useEffect(() => {
    onCodeRef.current = onCode;
    pausedRef.current = paused;
  });

  const stop = () => {
    stream.current?.getTracks().forEach((t) => t.stop());
    stream.current = null;
  };
  useEffect(() => stop, []);

  async function start() {
    if (typeof window !== "undefined" && !window.isSecureContext) {
      setState({ kind: "refused", text: "The camera needs a secure page (https, or this computer's own address). Ask for Hearth's https address, or type the code below." });
      return;
    }
    if (!navigator.mediaDevices?.getUserMedia) {
      setState({ kind: "refused", text: "This browser offers no camera to web pages. Type the code below." });
      return;
    }
    setState({ kind: "starting" });
    try {
      const s = await navigator.mediaDevices.getUserMedia({ video: { facingMode: { ideal: "environment" } }, audio: false });
      stream.current = s;
      const v = video.current!;
      v.srcObject = s;
      await v.play();
      setState({ kind: "live" });
    } catch (err) {
      stop();
      setState({ kind: "refused", text: cameraProblem(err) });
    }
  }

  useEffect(() => {
    if (state.kind !== "live") return;
    const timer = window.setInterval(() => {
      const v = video.current;
      const c = canvas.current;
      if (!v || !c || pausedRef.current || v.readyState < 2 || !v.videoWidth) return;
      // A reduced frame is plenty for a traveler's code held near the lens, and keeps a phone cool.
      const scale = Math.min(1, 640 / v.videoWidth);
      c.width = Math.round(v.videoWidth * scale);
      c.height = Math.round(v.videoHeight * scale);
      const ctx = c.getContext("2d", { willReadFrequently: true });
      if (!ctx) return;
      ctx.drawImage(v, 0, 0, c.width, c.height);
      const img = ctx.getImageData(0, 0, c.width, c.height);
      const found = jsQR(img.data, img.width, img.height, { inversionAttempts: "dontInvert" });
      if (!found?.data) return;
      const now = Date.now();
      // The same code held in view is read once, not five times a second.
      if (found.data === last.current.text && now - last.current.at < 3000) return;
      last.current = { text: found.data, at: now };
      onCodeRef.current(found.data);
    }, 200);
    return () => window.clearInterval(timer);
  }, [state.kind]);

  return (
    <section aria-label="Camera" className="rounded-card border border-soot-200 bg-white p-3 shadow-card">
      <div className={`relative overflow-hidden rounded-md bg-soot-900 ${state.kind === "live" || state.kind === "starting" ? "" : "hidden"}`}>
        <video ref={video} playsInline muted className="aspect-[4/3] w-full object-cover" aria-label="Camera view: hold the traveler's QR code inside the frame" />
        <div className="pointer-events-none absolute inset-8 rounded-lg border-4 border-ember-400/80" aria-hidden="true" />
      </div>
      <canvas ref={canvas} className="hidden" aria-hidden="true" />
      {state.kind === "refused" ? (
        <p role="alert" className="rounded-md bg-brass-100 px-3 py-2 text-sm text-soot-900" data-testid="camera-problem">
          {state.text}
        </p>
      ) : null}
      <div className="mt-2 flex flex-wrap gap-2">
        {state.kind === "live" ? (
          <button type="button" onClick={() => (stop(), setState({ kind: "idle" }))} className="min-h-11 rounded-md border border-soot-300 px-4 text-sm font-semibold text-soot-800 hover:bg-soot-50">
            Stop camera
          </button>
        ) : (
          <button type="button" onClick={start} disabled={state.kind === "starting"} className="min-h-11 rounded-md bg-soot-900 px-4 text-sm font-semibold text-soot-50 hover:bg-soot-800 disabled:opacity-60" data-testid="camera-start">
            {state.kind === "starting" ? "Starting the camera…" : "Scan with the camera"}
          </button>
        )}
        {state.kind === "live" ? <span className="self-center text-sm text-soot-600">Hold the QR code in the frame.</span> : null}
      </div>
    </section>
  );
}
