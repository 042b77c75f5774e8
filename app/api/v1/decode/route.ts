import { routes } from "@/lib/api/methods";
import { decode } from "@/lib/api/endpoints/decode";

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = routes(decode);
