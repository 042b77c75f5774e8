import { routes } from "@/lib/api/methods";
import { createSimulation, listSimulations } from "@/lib/api/endpoints/simulations";

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = routes(createSimulation, listSimulations);
