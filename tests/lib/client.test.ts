import { readFileSync } from "node:fs";
import type { AddressInfo } from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createParitasClient } from "@/packages/client/src/index";
import { clientTypes } from "@/scripts/gen-client";
import { createApp } from "@/tests/helpers/app";
import { makeOrgWithKey } from "@/tests/helpers/fixtures";

const server = createApp();
let baseUrl = "";

beforeAll(async () => {
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", () => r()));
  baseUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}/api/v1`;
});
afterAll(() => new Promise<void>((r) => server.close(() => r())));

describe("typed client", () => {
  it("packages/client/src/paritas.d.ts is up to date with the OpenAPI document (run npm run gen:client)", async () => {
    expect(readFileSync("packages/client/src/paritas.d.ts", "utf8")).toBe(await clientTypes());
  });

  it("calls the API with a key and returns the typed body", async () => {
    const { key } = await makeOrgWithKey();
    const client = createParitasClient({ baseUrl, key });
    const { data, error, response } = await client.POST("/capacity", { body: { channel: "bsc", p: 0.11 } });
    expect(error).toBeUndefined();
    expect(response.status).toBe(200);
    // C_BSC(0.11) ≈ 0.500 (REFERENCES.md, Shannon 1948).
    expect(data!.capacity!.value).toBeCloseTo(0.5, 3);
  });

  it("returns the problem body as `error` on a 422", async () => {
    const { key } = await makeOrgWithKey();
    const client = createParitasClient({ baseUrl, key });
    const { error, response } = await client.POST("/capacity", { body: { channel: "bsc", p: 2 } });
    expect(response.status).toBe(422);
    expect(error?.errors?.[0]?.pointer).toBe("/p");
  });
});
