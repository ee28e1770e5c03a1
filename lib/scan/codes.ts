import { z } from "zod";

// What a scan or a typed code can name. A traveler's QR code carries the build page's address
// (lib/builds/traveler.ts); the printed codes (unit serials, build, wash batch and furnace run
// codes) are typed as they stand on the paper.

export const SCAN_KINDS = ["unit", "build", "wash_batch", "furnace_run"] as const;
export type ScanKind = (typeof SCAN_KINDS)[number];

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

const PAGE: Record<ScanKind, string> = {
  unit: "/units/",
  build: "/builds/",
  wash_batch: "/batches/wash/",
  furnace_run: "/furnace-runs/",
};

export function pageFor(kind: ScanKind, id: string): string {
  return `${PAGE[kind]}${id}`;
}

export type ParsedScan = { kind: "page"; scanKind: ScanKind; id: string } | { kind: "code"; code: string };

/**
 * A scanned text names a page when it is an address whose path is one of Hearth's record pages
 * (any host: the printed address may be the shop's public name, the phone may use another);
 * anything else is a printed code. Only the path is ever kept, so a scanned address can never
 * send the browser to another site.
 */
export function parseScan(raw: string): ParsedScan | null {
  const text = raw.trim();
  if (!text) return null;
  let path: string | null = null;
  if (/^https?:\/\//i.test(text)) {
    try {
      path = new URL(text).pathname;
    } catch {
      path = null;
    }
  } else if (text.startsWith("/")) path = text.split(/[?#]/)[0];
  if (path !== null) {
    for (const kind of SCAN_KINDS) {
      const prefix = PAGE[kind];
      if (path.startsWith(prefix)) {
        const id = path.slice(prefix.length).replace(/\/$/, "");
        if (UUID.test(id)) return { kind: "page", scanKind: kind, id: id.toLowerCase() };
      }
    }
    return null;
  }
  const code = text.replace(/\s+/g, "").toUpperCase();
  return scanCodeSchema.safeParse(code).success ? { kind: "code", code } : null;
}

/** Printed codes: letters, digits and dashes, as on travelers and labels. */
export const scanCodeSchema = z.string().trim().min(2, "too short for a code").max(64, "too long for a code").regex(/^[A-Za-z0-9][A-Za-z0-9._/-]*$/, "letters, digits and dashes only");

export type ScanHit = { kind: ScanKind; id: string; code: string; href: string; state: string; version: number };
