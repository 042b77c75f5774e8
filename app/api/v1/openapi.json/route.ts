import { requestIdFor } from "@/lib/api/http";
import { methods } from "@/lib/api/methods";
import { buildOpenApiDocument } from "@/openapi/document";

const document = JSON.stringify(buildOpenApiDocument());

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({
  GET: (req) =>
    new Response(document, {
      headers: { "content-type": "application/json", "cache-control": "public, max-age=300", "x-request-id": requestIdFor(req) },
    }),
});
