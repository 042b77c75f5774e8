import type { Endpoint } from "./endpoint";
import { bsc } from "./endpoints/bsc";
import { capacity } from "./endpoints/capacity";
import { distance } from "./endpoints/distance";
import { linkBer } from "./endpoints/links";
import { usage } from "./endpoints/usage";

/** Every public endpoint, in the order the reference lists them. */
export const endpoints: Endpoint[] = [distance, bsc, capacity, linkBer, usage] as unknown as Endpoint[];
