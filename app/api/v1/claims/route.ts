import { routes } from "@/lib/api/methods";
import { createClaim, listClaimsEndpoint } from "@/lib/api/endpoints/claims";

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = routes(createClaim, listClaimsEndpoint);
