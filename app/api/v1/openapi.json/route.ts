import { buildOpenApiDocument } from "@/openapi/document";

const document = JSON.stringify(buildOpenApiDocument());

export function GET(): Response {
  return new Response(document, { headers: { "content-type": "application/json", "cache-control": "public, max-age=300" } });
}
