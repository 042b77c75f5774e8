import { routes } from "@/lib/api/endpoint";
import { linkBer } from "@/lib/api/endpoints/links";

export const { GET, POST, PUT, PATCH, DELETE } = routes(linkBer);
