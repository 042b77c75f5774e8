import { z } from "zod";
import { logError, redactSecrets } from "./redact";

/** Field errors listed in one problem at most; `omittedErrors` counts the rest, so a huge bad batch gives a small answer. */
export const MAX_FIELD_ERRORS = 20;

/** Every problem the API can answer with: code → HTTP status and a stable title (RFC 9457 §3.1). */
export const problemTypes = {
  "bad-request": { status: 400, title: "The request could not be read", help: "The body is not valid JSON, or a header is malformed. Fix the syntax and send it again." },
  "unauthenticated": { status: 401, title: "A valid API key is required", help: "Send `Authorization: Bearer <key>` with a key that exists, is not revoked and has not expired." },
  "signed-out": { status: 401, title: "Sign-in required", help: "The console needs a valid session. Sign in again; sessions end after a while." },
  "quota-exhausted": { status: 402, title: "Not enough compute units left this month", help: "The call needs more compute units than the key's monthly allowance has left (`quota` says how many, and when it resets). Live keys on the free plan and all test keys stop at their allowance; paid plans bill live units beyond it. Wait for the reset, or move to a paid plan in the console." },
  "forbidden": { status: 403, title: "The key may not do this", help: "The key lacks the scope this operation needs. Create a key with that scope." },
  "role-refused": { status: 403, title: "Your role does not allow this", help: "Roles are owner, developer and billing. An owner of the organisation can change your role." },
  "cross-origin": { status: 403, title: "Cross-origin request refused", help: "Console changes are accepted only from the console's own origin (the `Origin` header, or `Sec-Fetch-Site: same-origin`)." },
  "reauth-required": { status: 403, title: "Confirm your password first", help: "Creating or rotating a live key, transferring ownership and removing another member need a password confirmed recently in this session, or a fresh sign-in. Confirm it (the console asks for it) and repeat the action." },
  "invitation-mismatch": { status: 403, title: "The invitation is for another e-mail address", help: "Sign in with the address the invitation was sent to, or ask an owner to invite this one." },
  "not-found": { status: 404, title: "No such resource", help: "The path or the resource does not exist, or it belongs to another organisation." },
  "method-not-allowed": { status: 405, title: "Method not allowed on this path", help: "The `Allow` response header lists the methods this path accepts." },
  "conflict": { status: 409, title: "The request conflicts with one in progress", help: "A request with the same Idempotency-Key is still running. Retry after it finishes." },
  "last-owner": { status: 409, title: "The organisation needs an owner", help: "The last owner cannot leave, be removed or lose the owner role. Make another member an owner first." },
  "already-member": { status: 409, title: "Already a member", help: "This person already belongs to the organisation; change their role instead." },
  "key-inactive": { status: 409, title: "The key is revoked or expired", help: "Only an active key can be rotated. Create a new key instead." },
  "gone": { status: 410, title: "The link is no longer valid", help: "The invitation was used, revoked or has expired. Ask an owner for a new one." },
  "reset-link-invalid": { status: 410, title: "The password link is no longer valid", help: "A password link works once, for one hour. Ask for a new one on the password reset page." },
  "payload-too-large": { status: 413, title: "The request body is too large", help: "Bodies are limited in size; split the work into several requests." },
  "unsupported-media-type": { status: 415, title: "The body must be JSON", help: "Send `Content-Type: application/json`." },
  "validation-failed": { status: 422, title: "The request has invalid fields", help: `\`errors\` lists each invalid field as a JSON pointer with a message, at most ${MAX_FIELD_ERRORS} (in a batch, each bad word once); \`omittedErrors\` counts those beyond.` },
  "work-limit": { status: 422, title: "The request asks for more work than one call may do", help: "`limit` names the quantity, what the request needs and what one call allows; the detail says how to ask for less (fewer words, a smaller code, or an option that skips the costly part)." },
  "deadline-exceeded": { status: 422, title: "The computation ran past its deadline", help: "The work was stopped when it reached the per-call time limit named in `limit`. Ask for less in one call: split a batch, or choose a smaller code." },
  "memory-limit": { status: 422, title: "The computation ran out of its memory allowance", help: "The work was stopped when it exceeded the per-task memory ceiling named in `limit`. Ask for less in one call." },
  "idempotency-key-reused": { status: 422, title: "Idempotency-Key reused with another body", help: "An Idempotency-Key belongs to one request body. Use a new key for a new request." },
  "job-limit": { status: 429, title: "Too many jobs at once", help: "The organisation has as many simulations and simulated claims queued or running as it may (`limit`). Wait for one to end, or cancel one, and send again." },
  "rate-limited": { status: 429, title: "Too many requests", help: "Wait for the number of seconds in `Retry-After`. The RateLimit headers show the current window." },
  "server-busy": { status: 503, title: "The compute pool is full", help: "Every worker is busy and the queue is at its bound. Retry after the seconds in `Retry-After`." },
  "internal": { status: 500, title: "Something went wrong on our side", help: "The failure was logged with the request id. Retrying may help; if it does not, report the request id." },
} as const;

export type ProblemCode = keyof typeof problemTypes;

export interface FieldError {
  /** JSON pointer (RFC 6901) into the request body, or a query parameter as `?name`. */
  pointer: string;
  message: string;
}

/** A limit a request ran into: the quantity, how much the request needed (when known) and how much one call may have. */
export interface LimitInfo {
  quantity: string;
  requested?: number;
  allowed: number;
  unit: string;
}

/** The one error type of the API layer: raised anywhere, rendered once by `problemResponse`. */
/** Where a call stands against its monthly allowance, in a quota-exhausted problem. */
export interface QuotaInfo {
  plan: string;
  mode: "live" | "test";
  allowance: number;
  used: number;
  requested: number;
  resetsAt: string;
}

export class ApiError extends Error {
  constructor(
    readonly code: ProblemCode,
    readonly detail: string,
    readonly extra: { errors?: FieldError[]; omittedErrors?: number; headers?: Record<string, string>; limit?: LimitInfo; quota?: QuotaInfo } = {},
  ) {
    super(detail);
    this.name = "ApiError";
  }
  get status(): number {
    return problemTypes[this.code].status;
  }
}

export const problemTypeUri = (code: ProblemCode) => `/problems/${code}`;

/** JSON pointer for a path of keys (RFC 6901 escaping of `~` and `/`). */
export function toPointer(path: readonly PropertyKey[]): string {
  return path.map((p) => "/" + String(p).replace(/~/g, "~0").replace(/\//g, "~1")).join("");
}

/**
 * The validation-failed problem for `errors` (in the order given): the first MAX_FIELD_ERRORS listed, and
 * the number left out in `omittedErrors`. `summary` opens the detail when there is more than one error.
 */
export function validationProblem(errors: FieldError[], summary = `${errors.length} fields are invalid`): ApiError {
  const listed = errors.slice(0, MAX_FIELD_ERRORS);
  const omitted = errors.length - listed.length;
  const first = errors[0];
  const detail =
    errors.length === 1 && first
      ? `${first.pointer || "the body"}: ${first.message}`
      : omitted > 0
        ? `${summary}; errors lists the first ${listed.length} and omittedErrors counts the other ${omitted}.`
        : `${summary}; see errors.`;
  return new ApiError("validation-failed", detail, { errors: listed, ...(omitted > 0 ? { omittedErrors: omitted } : {}) });
}

/** zod issues → field errors with JSON pointers; an unknown field of a strict object points at that field itself. */
export function fieldErrorsFromZod(error: z.ZodError, prefix = ""): FieldError[] {
  return error.issues.flatMap((issue) =>
    issue.code === "unrecognized_keys"
      ? issue.keys.map((key) => ({ pointer: prefix + toPointer([...issue.path, key]), message: `Unknown field \`${key}\`.` }))
      : [{ pointer: prefix + toPointer(issue.path), message: issue.message }],
  );
}

export const problemSchema = z
  .object({
    type: z.string().meta({ example: "/problems/validation-failed" }),
    title: z.string(),
    status: z.number().int(),
    detail: z.string(),
    instance: z.string().meta({ description: "The request id of the failed request." }),
    errors: z
      .array(z.object({ pointer: z.string(), message: z.string() }))
      .optional()
      .meta({ description: `Each invalid field as a JSON pointer into the body (or \`?name\` for a query parameter) with a message; at most ${MAX_FIELD_ERRORS}.` }),
    omittedErrors: z
      .number()
      .int()
      .min(1)
      .optional()
      .meta({
        description: `Present when more than ${MAX_FIELD_ERRORS} fields are invalid: how many were found beyond those \`errors\` lists. In a batch of words, each bad word counts once.`,
      }),
    limit: z
      .object({ quantity: z.string(), requested: z.number().optional(), allowed: z.number(), unit: z.string() })
      .optional()
      .meta({ description: "Work, deadline and memory limits: the quantity, what the request needed (when known) and what one call allows." }),
    quota: z
      .object({
        plan: z.string().meta({ description: "The organisation's plan." }),
        mode: z.enum(["live", "test"]).meta({ description: "Which allowance: live and test keys have their own." }),
        allowance: z.number().int().meta({ description: "Compute units a month." }),
        used: z.number().int().meta({ description: "Used so far this month, including units held by running jobs." }),
        requested: z.number().int().meta({ description: "What the refused call needed." }),
        resetsAt: z.string().meta({ description: "When the allowance renews: the start of the next calendar month, UTC." }),
      })
      .optional()
      .meta({ description: "In a quota-exhausted problem: where the key's allowance stands." }),
  })
  .meta({ id: "Problem", description: "RFC 9457 problem details." });

export type Problem = z.infer<typeof problemSchema>;

/** Render an ApiError (or anything else, as a 500 that reveals nothing) as application/problem+json. */
export function problemResponse(err: unknown, requestId: string): Response {
  const e = err instanceof ApiError ? err : new ApiError("internal", "An unexpected error occurred. Quote the request id when reporting it.");
  if (!(err instanceof ApiError)) logError(`[${requestId}] unexpected failure`, err);
  const body: Problem = {
    type: problemTypeUri(e.code),
    title: problemTypes[e.code].title,
    status: e.status,
    // A problem never echoes a whole key or credential, even one the caller put in a field name (`Unknown field …`).
    detail: redactSecrets(e.detail),
    instance: requestId,
    ...(e.extra.errors ? { errors: e.extra.errors.map((f) => ({ pointer: redactSecrets(f.pointer), message: redactSecrets(f.message) })) } : {}),
    ...(e.extra.omittedErrors ? { omittedErrors: e.extra.omittedErrors } : {}),
    ...(e.extra.limit ? { limit: e.extra.limit } : {}),
    ...(e.extra.quota ? { quota: e.extra.quota } : {}),
  };
  return new Response(JSON.stringify(body), {
    status: e.status,
    headers: { "content-type": "application/problem+json", "x-request-id": requestId, ...e.extra.headers },
  });
}
