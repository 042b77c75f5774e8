import { noRoute } from "@/lib/api/methods";

// Any path under /api that no other route serves: a 404 problem for every method, never the HTML page.
export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = noRoute;
