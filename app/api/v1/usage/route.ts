import { routes } from "@/lib/api/endpoint";
import { usage } from "@/lib/api/endpoints/usage";

export const { GET, POST, PUT, PATCH, DELETE } = routes(usage);
