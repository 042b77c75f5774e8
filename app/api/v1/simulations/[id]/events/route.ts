import { routes } from "@/lib/api/methods";
import { simulationEvents } from "@/lib/api/endpoints/simulations";

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = routes(simulationEvents);
