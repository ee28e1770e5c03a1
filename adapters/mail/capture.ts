import { AppError } from "@/lib/errors";
import { getEnv } from "@/lib/env";
import { capturedListSchema, type CapturedMessage } from "@/lib/mail/schemas";

/** Reads the local capture server's messages (newest first). Only a local set-up has one. */
export async function fetchCapturedMessages(opts: { to?: string; limit: number }): Promise<CapturedMessage[]> {
  const base = getEnv().MAIL_CAPTURE_URL;
  if (!base) throw new AppError("unavailable", "No mail capture server is configured (MAIL_CAPTURE_URL); with a real SMTP relay, read the mail in the recipients' mailboxes.");
  const url = new URL("/messages", base);
  if (opts.to) url.searchParams.set("to", opts.to);
  let res: Response;
  try {
    res = await fetch(url, { signal: AbortSignal.timeout(5_000), cache: "no-store" });
  } catch (err) {
    throw new AppError("unavailable", `The mail capture server at ${url.origin} does not answer (${err instanceof Error ? err.message : String(err)}).`);
  }
  if (!res.ok) throw new AppError("unavailable", `The mail capture server answered ${res.status}.`);
  const parsed = capturedListSchema.safeParse(await res.json().catch(() => null));
  if (!parsed.success) throw new AppError("unavailable", "The mail capture server sent something that is not a message list.");
  return parsed.data.messages.slice(0, opts.limit);
}
