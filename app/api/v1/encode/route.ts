import { routes } from "@/lib/api/methods";
import { encode } from "@/lib/api/endpoints/encode";

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = routes(encode);
