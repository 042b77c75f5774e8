import { methods } from "@/lib/api/methods";

/** Liveness probe; also the constant-response baseline of the benchmark. */
export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: () => Response.json({ ok: true }) });
