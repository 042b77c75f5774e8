import { routes } from "@/lib/api/http";
import { linkBer } from "@/lib/api/endpoints/links";

export const { GET, POST, PUT, PATCH, DELETE } = routes(linkBer);
