import { z } from "zod";
import type { Db } from "@/db";
import { claimLabels, listClaims } from "@/db/queries/claims";
import type { ClaimVerdict, Org } from "@/db/schema";
import { present, settle } from "@/lib/api/endpoints/claims";
import { cursorParam, decodeCursor, limitParam, newestFirstCursor, newestFirstPage } from "@/lib/api/pagination";
import { invalidField } from "./common";

const CLAIM_VERDICTS = ["pending", "supported", "refuted", "inconclusive"] as const satisfies readonly ClaimVerdict[];

export const claimsQuery = z.strictObject({
  label: z.string().min(1).max(120).optional(),
  verdict: z.enum(CLAIM_VERDICTS).optional(),
  limit: limitParam(100, 25),
  cursor: cursorParam,
});

/** The side list shows this many labels, the most recently claimed first. */
const MAX_LABELS = 200;

/** Pending claims settled per read: far more than an org may have simulations running. */
const MAX_PENDING = 100;

/**
 * The Claims page's data: one page of claims (newest first; one label's and one verdict's when asked), each
 * exactly as GET /api/v1/claims/{id} presents it plus the simulation job behind it, and every label with its
 * latest verdict and counts.
 */
export async function listOrgClaims(db: Db, org: Pick<Org, "id">, q: z.output<typeof claimsQuery>) {
  const before = q.cursor === undefined ? undefined : decodeCursor(q.cursor, newestFirstCursor);
  if (q.cursor !== undefined && !before) throw invalidField("/cursor", "The cursor is not one this list returned.");
  // Simulations that ended since their claims were last read decide them now, as a read through the API would, so the
  // filters and the labels' latest verdicts see the verdicts (pending claims are few: one per running simulation, at most).
  for (const row of await listClaims(db, org.id, { verdict: "pending", limit: MAX_PENDING })) await settle(db, row);
  const [rows, labels] = await Promise.all([listClaims(db, org.id, { label: q.label, verdict: q.verdict, limit: q.limit + 1, before }), claimLabels(db, org.id, MAX_LABELS)]);
  const { page, nextCursor } = newestFirstPage(rows, q.limit);
  return {
    claims: page.map((row) => ({ ...present(row), jobId: row.job_id })),
    nextCursor,
    labels: labels.map((l) => ({
      label: l.label,
      latestAt: l.latestAt,
      latestVerdict: l.latestVerdict!,
      total: Number(l.total),
      counts: { supported: Number(l.supported), refuted: Number(l.refuted), inconclusive: Number(l.inconclusive), pending: Number(l.pending) },
    })),
  };
}
