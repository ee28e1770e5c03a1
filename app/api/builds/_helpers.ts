import { AppError } from "@/lib/errors";

export type IdContext = { params: Promise<{ id: string }> };

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** The [id] segment; anything that is not a uuid names nothing, so it is a 404, not a 500. */
export async function readId(ctx: IdContext, what: string): Promise<string> {
  const { id } = await ctx.params;
  if (!UUID.test(id)) throw new AppError("not_found", `${what} not found.`);
  return id.toLowerCase();
}

/** Query-string parameters as a plain object for a zod schema. */
export function searchParams(req: Request): Record<string, string> {
  return Object.fromEntries(new URL(req.url).searchParams.entries());
}
