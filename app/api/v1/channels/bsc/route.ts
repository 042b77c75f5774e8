import { routes } from "@/lib/api/endpoint";
import { bsc } from "@/lib/api/endpoints/bsc";

export const { GET, POST, PUT, PATCH, DELETE } = routes(bsc);
