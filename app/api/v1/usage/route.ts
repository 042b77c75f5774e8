import { routes } from "@/lib/api/methods";
import { usage } from "@/lib/api/endpoints/usage";

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = routes(usage);
