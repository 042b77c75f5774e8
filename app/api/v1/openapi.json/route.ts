import { requestIdFor } from "@/lib/api/http";
import { buildOpenApiDocument } from "@/openapi/document";

const document = JSON.stringify(buildOpenApiDocument());

export function GET(req: Request): Response {
  return new Response(document, {
    headers: { "content-type": "application/json", "cache-control": "public, max-age=300", "x-request-id": requestIdFor(req) },
  });
}
