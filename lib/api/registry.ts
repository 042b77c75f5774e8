import type { Endpoint } from "./endpoint";
import { analyze } from "./endpoints/analyze";
import { bsc } from "./endpoints/bsc";
import { capacity } from "./endpoints/capacity";
import { decode } from "./endpoints/decode";
import { distance } from "./endpoints/distance";
import { encode } from "./endpoints/encode";
import { linkBer } from "./endpoints/links";
import { usage } from "./endpoints/usage";

/** Every public endpoint, in the order the reference lists them. */
export const endpoints: Endpoint[] = [analyze, encode, decode, distance, bsc, capacity, linkBer, usage] as unknown as Endpoint[];
