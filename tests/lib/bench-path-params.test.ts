import { describe, expect, it } from "vitest";
import { splitPathParams } from "@/app/console/(signed-in)/[org]/try/run";
import { endpointCatalogue } from "@/lib/console/account";

/** The bench fills a path's {parameters} from form fields that the catalogue adds for them. */
describe("path parameters on the bench", () => {
  const byId = (id: string) => endpointCatalogue().find((e) => e.id === id)!;

  it("the catalogue gives GET /claims/{id} and DELETE /simulations/{id} a required id field", () => {
    for (const id of ["claims.get", "simulations.cancel", "simulations.events"]) {
      const schema = byId(id).inputSchema as { properties: Record<string, unknown>; required: string[] };
      expect(Object.keys(schema.properties), id).toContain("id");
      expect(schema.required, id).toContain("id");
    }
    // Endpoints without path parameters are as before.
    expect(JSON.stringify(byId("claims.list").inputSchema)).not.toMatch(/"id":\{"type":"string","pattern"/);
  });

  it("splits the form's values into the path and the rest, and writes the concrete path", () => {
    const e = byId("simulations.events");
    expect(splitPathParams(e, { id: "sim-0123456789abcdef" })).toEqual({ path: { id: "sim-0123456789abcdef" }, rest: {}, concrete: "/simulations/sim-0123456789abcdef/events" });
    const list = byId("claims.list");
    expect(splitPathParams(list, { label: "fw/1", limit: 5 })).toEqual({ path: {}, rest: { label: "fw/1", limit: 5 }, concrete: "/claims" });
    // An id is written into the path encoded, never as a second path segment.
    expect(splitPathParams(byId("claims.get"), { id: "a/b" }).concrete).toBe("/claims/a%2Fb");
  });
});
