import { routes } from "@/lib/api/http";
import { capacity } from "@/lib/api/endpoints/capacity";

export const { GET, POST, PUT, PATCH, DELETE } = routes(capacity);
