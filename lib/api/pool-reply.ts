import { InputError } from "@/lib/core/errors";
import type { PoolReply } from "@/lib/jobs/pool";
import { ApiError, type ProblemCode } from "./errors";

/** A pool task's JSON text, or the error it threw raised again as its own type (classes do not cross threads, so the worker sends them as data). */
export function replyJson(reply: PoolReply): string {
  if (reply.ok) return reply.json;
  const err = reply.error;
  if (err.kind === "input") throw new InputError(err.message, err.path);
  throw new ApiError(err.code as ProblemCode, err.detail, err.extra);
}
