import { routes } from "@/lib/api/http";
import { encode } from "@/lib/api/endpoints/encode";

export const { GET, POST, PUT, PATCH, DELETE } = routes(encode);
