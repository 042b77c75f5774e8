import { computeEndpoints } from "./compute-endpoints";
import type { Endpoint } from "./endpoint";
import { createClaim, getClaim, listClaimsEndpoint } from "./endpoints/claims";
import { cancelSimulation, createSimulation, getSimulation, listSimulations, simulationEvents } from "./endpoints/simulations";
import { usage } from "./endpoints/usage";

/** Every public endpoint, in the order the reference lists them. */
export const endpoints: Endpoint[] = [...computeEndpoints, createClaim, listClaimsEndpoint, getClaim, createSimulation, listSimulations, getSimulation, simulationEvents, cancelSimulation, usage];
