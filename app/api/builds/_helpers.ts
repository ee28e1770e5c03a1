import { AppError } from "@/lib/errors";
import { isUuid } from "@/lib/ids";

export type IdContext = { params: Promise<{ id: string }> };

/**
 * One dynamic segment of the address. Next.js decodes the segments when the handler awaits its
 * params, and a malformed %-escape ("/api/builds/%E0%A4%A") throws URIError there: the client's
 * mistake, answered 400 (toErrorResponse maps a stray URIError the same way).
 */
export async function readParams<P extends Record<string, string | string[]>>(params: Promise<P>): Promise<P> {
  try {
    return await params;
  } catch (err) {
    if (err instanceof URIError) throw new AppError("bad_request", "The address contains a malformed %-escape.");
    throw err;
  }
}

/** The [id] segment; anything that is not a uuid names nothing, so it is a 404, not a 500. */
export async function readId(ctx: IdContext, what: string): Promise<string> {
  const { id } = await readParams(ctx.params);
  if (!isUuid(id)) throw new AppError("not_found", `${what} not found.`);
  return id.toLowerCase();
}

/** Query-string parameters as a plain object for a zod schema. */
export function searchParams(req: Request): Record<string, string> {
  return Object.fromEntries(new URL(req.url).searchParams.entries());
}
