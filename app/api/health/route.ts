/** Liveness probe; also the constant-response baseline of the benchmark. */
export function GET(): Response {
  return Response.json({ ok: true });
}
