import { computeEndpoints } from "@/lib/api/compute-endpoints";

/** operationId → request example name → the 200 body that example gets. */
export type ResponseExamples = Record<string, Record<string, unknown>>;

/** Runs every math endpoint's request examples through its handler, as the HTTP layer does (parse, run, JSON). */
export function responseExamples(): ResponseExamples {
  return Object.fromEntries(
    computeEndpoints.map((e) => [
      e.id,
      Object.fromEntries(Object.entries(e.examples).map(([name, ex]) => [name, JSON.parse(JSON.stringify(e.handler(e.input.parse(ex.value)))) as unknown])),
    ]),
  );
}
