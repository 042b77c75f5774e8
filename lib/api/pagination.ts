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
