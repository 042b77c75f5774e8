import { routes } from "@/lib/api/http";
import { distance } from "@/lib/api/endpoints/distance";

export const { GET, POST, PUT, PATCH, DELETE } = routes(distance);
