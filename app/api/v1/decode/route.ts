import { routes } from "@/lib/api/endpoint";
import { decode } from "@/lib/api/endpoints/decode";

export const { GET, POST, PUT, PATCH, DELETE } = routes(decode);
