// Fetch helpers for the batching pages.
export { ApiError, getJson, sendJson } from "@/lib/http/client";
