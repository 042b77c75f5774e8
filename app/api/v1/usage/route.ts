import { routes } from "@/lib/api/http";
import { usage } from "@/lib/api/endpoints/usage";

export const { GET, POST, PUT, PATCH, DELETE } = routes(usage);
