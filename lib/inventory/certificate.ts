// Where a lot's certificate of analysis lives in the object store: one folder per lot, so the
// orphan sweep (worker/orphans.ts) can walk it like the other upload folders.
export const CERTIFICATE_PREFIX = "certificates/";
