import { beforeAll, describe, expect, it } from "vitest";
import { expectFieldError, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const call = (body: unknown) => postJson("/api/v1/tests/plan", body, auth);
const ok = { targetBer: 1e-9, confidence: 0.95 };

describe("POST /tests/plan: bad input", () => {
  it.each([
    ["targetBer missing", { confidence: 0.95 }, "/targetBer"],
    ["targetBer 0", { ...ok, targetBer: 0 }, "/targetBer"],
    ["targetBer below 1e-13", { ...ok, targetBer: 1e-14 }, "/targetBer"],
    ["targetBer 0.5", { ...ok, targetBer: 0.5 }, "/targetBer"],
    ["targetBer a string", { ...ok, targetBer: "1e-9" }, "/targetBer"],
    ["confidence missing", { targetBer: 1e-9 }, "/confidence"],
    ["confidence as a percentage", { ...ok, confidence: 95 }, "/confidence"],
    ["confidence below 0.5", { ...ok, confidence: 0.4 }, "/confidence"],
    ["confidence 1", { ...ok, confidence: 1 }, "/confidence"],
    ["maxErrors negative", { ...ok, maxErrors: -1 }, "/maxErrors"],
    ["maxErrors over 100", { ...ok, maxErrors: 101 }, "/maxErrors"],
    ["maxErrors fractional", { ...ok, maxErrors: 1.5 }, "/maxErrors"],
    ["onlyMaxErrors not a boolean", { ...ok, onlyMaxErrors: "yes" }, "/onlyMaxErrors"],
    ["lineRateBps 0", { ...ok, lineRateBps: 0 }, "/lineRateBps"],
    ["lineRateBps below 1 bit/s", { ...ok, lineRateBps: 1e-300 }, "/lineRateBps"],
    ["lineRateBps over 1e13", { ...ok, lineRateBps: 2e13 }, "/lineRateBps"],
    ["trueBerFraction 0", { ...ok, trueBerFraction: 0 }, "/trueBerFraction"],
    ["trueBerFraction over 10", { ...ok, trueBerFraction: 11 }, "/trueBerFraction"],
    ["an unknown field", { ...ok, errors: 2 }, "/errors"],
  ])("%s → 422 at the field, stating the field's rule", async (_name, body, pointer) => {
    const field = pointer.slice(1);
    expectFieldError(await call(body), pointer, field === "errors" ? /Unknown field `errors`/ : new RegExp(`^\`${field}\` must be `));
  });

  it("a true BER above 0.5 (trueBerFraction × targetBer) → 422 saying what the product is", async () => {
    expectFieldError(await call({ targetBer: 0.1, confidence: 0.95, trueBerFraction: 6 }), "/trueBerFraction", /true BER.*at most 0\.5/);
  });

  it("a body that is not an object → 422, never a 500", async () => {
    const res = await call([1e-9, 0.95]);
    expect(res.status).toBe(422);
    expect(res.headers["content-type"]).toMatch(/application\/problem\+json/);
  });
});
