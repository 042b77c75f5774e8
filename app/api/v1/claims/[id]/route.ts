import { routes } from "@/lib/api/methods";
import { getClaim } from "@/lib/api/endpoints/claims";

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = routes(getClaim);
