import { routes } from "@/lib/api/methods";
import { capacity } from "@/lib/api/endpoints/capacity";

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = routes(capacity);
