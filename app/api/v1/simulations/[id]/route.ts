import { routes } from "@/lib/api/methods";
import { cancelSimulation, getSimulation } from "@/lib/api/endpoints/simulations";

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = routes(getSimulation, cancelSimulation);
