import { z } from "zod";

/** Opaque cursors: base64url JSON of the last row's sort key, checked by a schema when read back. */
export function encodeCursor(value: unknown): string {
  return Buffer.from(JSON.stringify(value)).toString("base64url");
}

export function decodeCursor<T extends z.ZodType>(cursor: string, schema: T): z.output<T> | undefined {
  try {
    const parsed = schema.safeParse(JSON.parse(Buffer.from(cursor, "base64url").toString("utf8")));
    return parsed.success ? parsed.data : undefined;
  } catch {
    return undefined;
  }
}

export const limitParam = (max: number, dflt: number) =>
  z.coerce.number().int().min(1).max(max).default(dflt).meta({ description: `Rows per page, 1 to ${max} (default ${dflt}).` });

export const cursorParam = z
  .string()
  .max(512)
  // encodeCursor writes base64url, so nothing else can be a cursor this API returned.
  .regex(/^[A-Za-z0-9_-]+$/, "The cursor is not one this endpoint returned.")
  .optional()
  .meta({ description: "`nextCursor` of the previous page." });

/** The cursor of a newest-first list ordered by (created_at, id): claims, simulations. */
export const newestFirstCursor = z.object({ createdAt: z.string(), id: z.string() });

/** The page of `rows` (read with limit + 1, newest first) and the next page's cursor: the last row's (created_at, id), if more remain. */
export function newestFirstPage<R extends { created_at: string; id: string }>(rows: R[], limit: number): { page: R[]; nextCursor: string | null } {
  const page = rows.slice(0, limit);
  const last = page.at(-1);
  return { page, nextCursor: rows.length > limit && last ? encodeCursor({ createdAt: last.created_at, id: last.id }) : null };
}
