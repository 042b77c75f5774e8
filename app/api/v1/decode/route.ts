import { routes } from "@/lib/api/http";
import { decode } from "@/lib/api/endpoints/decode";

export const { GET, POST, PUT, PATCH, DELETE } = routes(decode);
