import type { ComputeEndpoint } from "./endpoint";
import { analyze } from "./endpoints/analyze";
import { bsc } from "./endpoints/bsc";
import { capacity } from "./endpoints/capacity";
import { decode } from "./endpoints/decode";
import { distance } from "./endpoints/distance";
import { encode } from "./endpoints/encode";
import { linkBer } from "./endpoints/links";
import { testPlan } from "./endpoints/test-plan";

/** The math endpoints, in the order the reference lists them: the pool's worker imports only these (no database). */
export const computeEndpoints: ComputeEndpoint[] = [analyze, encode, decode, distance, bsc, capacity, linkBer, testPlan];
