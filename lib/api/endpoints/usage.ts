import { z } from "zod";
import { usageByDayAndEndpoint } from "@/db/queries/usage";
import { InputError } from "@/lib/core/errors";
import { defineDataEndpoint } from "../endpoint";
import { cursorParam, decodeCursor, encodeCursor, limitParam } from "../pagination";

const DAY_MS = 86_400_000;
/** Longest period one request may cover. */
export const MAX_USAGE_DAYS = 400;
// Date.parse rolls impossible days over (2026-02-30 → 2026-03-02), so the date must also read back unchanged.
const isCalendarDate = (s: string) => !Number.isNaN(Date.parse(s)) && new Date(Date.parse(s)).toISOString().slice(0, 10) === s;
const day = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, "Use a date as YYYY-MM-DD.")
  .refine(isCalendarDate, "Not a calendar date.")
  .meta({ format: "date" });
const cursorShape = z.object({ day: z.string(), endpoint: z.string() });

const input = z
  .strictObject({
    from: day.optional().meta({ description: `First UTC day, inclusive (default: 29 days before \`to\`); not after \`to\`, and the period at most ${MAX_USAGE_DAYS} days.` }),
    to: day.optional().meta({ description: "Last UTC day, inclusive (default: today)." }),
    limit: limitParam(500, 100),
    cursor: cursorParam,
  })
  .meta({ id: "UsageQuery" });

const output = z
  .object({
    org: z.string().meta({ description: "Slug of the calling key's organisation." }),
    from: z.string(),
    to: z.string(),
    data: z.array(
      z.object({
        day: z.string(),
        endpoint: z.string().meta({ description: "Operation id." }),
        calls: z.number().int(),
        units: z.number().int().meta({ description: "Compute units charged; refused calls and idempotent replays cost 0." }),
        errors: z.number().int().meta({ description: "Calls answered with a status of 400 or more." }),
      }),
    ),
    nextCursor: z.string().nullable(),
  })
  .meta({ id: "UsagePage" });

export const usage = defineDataEndpoint({
  id: "usage",
  method: "GET",
  path: "/usage",
  scope: "usage:read",
  tag: "Account",
  summary: "The organisation's metered usage by day and endpoint",
  description: `Calls, compute units and errors per UTC day and endpoint for the calling key's organisation, over a period of at most ${MAX_USAGE_DAYS} days, with cursor pagination. Cost: 0 units.`,
  input,
  output,
  examples: {
    recent: { summary: "The last 30 days", value: {} },
    period: { summary: "One week, 50 rows a page", value: { from: "2026-11-01", to: "2026-11-07", limit: 50 } },
  },
  illustration: {
    summary: "Illustrative only: made-up rows; a call returns your organisation's own",
    value: {
      org: "brinewatch",
      from: "2026-11-01",
      to: "2026-11-07",
      data: [
        { day: "2026-11-01", endpoint: "codes.analyze", calls: 12, units: 12, errors: 0 },
        { day: "2026-11-01", endpoint: "decode", calls: 40, units: 55, errors: 2 },
        { day: "2026-11-02", endpoint: "capacity", calls: 3, units: 3, errors: 0 },
      ],
      nextCursor: null,
    },
  },
  cost: 0,
  handler: async (q, { db, principal }) => {
    const to = q.to ?? new Date().toISOString().slice(0, 10);
    const from = q.from ?? new Date(Date.parse(to) - 29 * DAY_MS).toISOString().slice(0, 10);
    if (from > to) throw new InputError("`from` is after `to`.", ["from"]);
    if ((Date.parse(to) - Date.parse(from)) / DAY_MS + 1 > MAX_USAGE_DAYS) throw new InputError(`The period is longer than ${MAX_USAGE_DAYS} days.`, ["from"]);
    const after = q.cursor === undefined ? undefined : decodeCursor(q.cursor, cursorShape);
    if (q.cursor !== undefined && !after) throw new InputError("The cursor is not one this endpoint returned.", ["cursor"]);
    const rows = await usageByDayAndEndpoint(db, {
      orgId: principal.orgId,
      from: `${from}T00:00:00.000Z`,
      to: new Date(Date.parse(to) + DAY_MS).toISOString(),
      limit: q.limit + 1,
      after,
    });
    const page = rows.slice(0, q.limit).map((r) => ({ ...r, calls: Number(r.calls), units: Number(r.units), errors: Number(r.errors) }));
    const last = page[page.length - 1];
    return { org: principal.orgSlug, from, to, data: page, nextCursor: rows.length > q.limit && last ? encodeCursor({ day: last.day, endpoint: last.endpoint }) : null };
  },
});
