import { uniformFloat64 } from "pure-rand/distribution/uniformFloat64";
import { xoroshiro128plus } from "pure-rand/generator/xoroshiro128plus";

/** A seeded uniform draw in [0, 1) (xoroshiro128+ from pure-rand): the same test data on every run. */
export function rng(seed: number): () => number {
  const g = xoroshiro128plus(seed);
  return () => uniformFloat64(g);
}
