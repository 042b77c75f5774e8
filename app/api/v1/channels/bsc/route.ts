import { routes } from "@/lib/api/http";
import { bsc } from "@/lib/api/endpoints/bsc";

export const { GET, POST, PUT, PATCH, DELETE } = routes(bsc);
