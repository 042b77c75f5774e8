import { routes } from "@/lib/api/methods";
import { linkBer } from "@/lib/api/endpoints/links";

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = routes(linkBer);
