import { routes } from "@/lib/api/http";
import { analyze } from "@/lib/api/endpoints/analyze";

export const { GET, POST, PUT, PATCH, DELETE } = routes(analyze);
