import { NextResponse } from "next/server";
import { z } from "zod";
import { getDb, type Database } from "@/db/client";
import type { Permission } from "@/lib/auth/permissions";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "./errors";
import { readId } from "@/app/api/builds/_helpers";

type Ctx = { params: Promise<{ id: string }> };

/** GET (list) and POST (create) for a plain set-up collection such as printers or furnaces. */
export function collectionHandlers<In, Row, ListRow>(opts: {
  many: string;
  one: string;
  read: Permission;
  write: Permission;
  schema: z.ZodType<In>;
  list: (db: Database) => Promise<ListRow[]>;
  create: (db: Database, input: In) => Promise<Row>;
}) {
  return {
    GET: async () => {
      try {
        await requireUser(opts.read);
        return NextResponse.json({ [opts.many]: await opts.list(getDb()) });
      } catch (err) {
        return toErrorResponse(err);
      }
    },
    POST: async (req: Request) => {
      try {
        await requireUser(opts.write);
        const input = opts.schema.parse(await readJson(req));
        return NextResponse.json({ [opts.one]: await opts.create(getDb(), input) }, { status: 201 });
      } catch (err) {
        return toErrorResponse(err);
      }
    },
  };
}

/** PATCH for one row guarded by its `version` (409 when someone else changed it first). */
export function versionedPatchHandler<In extends { version: number }, Row>(opts: {
  one: string;
  write: Permission;
  schema: z.ZodType<In>;
  update: (db: Database, id: string, version: number, input: Omit<In, "version">) => Promise<Row>;
}) {
  return async (req: Request, ctx: Ctx) => {
    try {
      await requireUser(opts.write);
      const id = await readId(ctx, opts.one.replace("_", " ").replace(/^./, (c) => c.toUpperCase()));
      const { version, ...input } = opts.schema.parse(await readJson(req));
      return NextResponse.json({ [opts.one]: await opts.update(getDb(), id, version, input) });
    } catch (err) {
      return toErrorResponse(err);
    }
  };
}
