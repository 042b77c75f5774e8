import { routes } from "@/lib/api/methods";
import { bsc } from "@/lib/api/endpoints/bsc";

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = routes(bsc);
