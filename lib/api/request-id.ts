import { randomBytes } from "node:crypto";
import { redactSecrets } from "./redact";

const REQUEST_ID = /^[A-Za-z0-9._:-]{8,128}$/;

/**
 * The caller's X-Request-Id when it is a sane token, else a new one. An id that is or holds a secret (a key
 * pasted into the wrong header) is replaced too: request ids are echoed, logged and kept with usage rows.
 */
export function requestIdFrom(given: string | null | undefined): string {
  return given && REQUEST_ID.test(given) && redactSecrets(given) === given ? given : `req_${randomBytes(12).toString("hex")}`;
}

/** The request id of a request: its own X-Request-Id when sane, else a new one. */
export const requestIdFor = (req: Request): string => requestIdFrom(req.headers.get("x-request-id"));
