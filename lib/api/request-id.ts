import { randomBytes } from "node:crypto";

const REQUEST_ID = /^[A-Za-z0-9._:-]{8,128}$/;

/** The caller's X-Request-Id when it is a sane token, else a new one. */
export function requestIdFrom(given: string | null | undefined): string {
  return given && REQUEST_ID.test(given) ? given : `req_${randomBytes(12).toString("hex")}`;
}

/** The request id of a request: its own X-Request-Id when sane, else a new one. */
export const requestIdFor = (req: Request): string => requestIdFrom(req.headers.get("x-request-id"));
