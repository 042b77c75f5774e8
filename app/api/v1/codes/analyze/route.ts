import { routes } from "@/lib/api/methods";
import { analyze } from "@/lib/api/endpoints/analyze";

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = routes(analyze);
