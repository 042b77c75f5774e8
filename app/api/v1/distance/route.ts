import { routes } from "@/lib/api/methods";
import { distance } from "@/lib/api/endpoints/distance";

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = routes(distance);
