import { beforeAll, describe, expect, it } from "vitest";
import { expectFieldError, expectProblem, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const call = (body: unknown) => postJson("/api/v1/channels/bsc", body, auth);

describe("POST /channels/bsc: bad input", () => {
  it.each([
    ["n missing", { p: 0.1 }, "/n"],
    ["n = 0", { n: 0, p: 0.1 }, "/n"],
    ["n negative", { n: -7, p: 0.1 }, "/n"],
    ["n not an integer", { n: 7.5, p: 0.1 }, "/n"],
    ["n a string", { n: "7", p: 0.1 }, "/n"],
    ["n over 10^6", { n: 1_000_001, p: 0.1 }, "/n"],
    ["p missing", { n: 7 }, "/p"],
    ["p negative", { n: 7, p: -0.001 }, "/p"],
    ["p over 1", { n: 7, p: 1.0001 }, "/p"],
    ["p a string", { n: 7, p: "0.1" }, "/p"],
    ["p null", { n: 7, p: null }, "/p"],
    ["flips negative", { n: 7, p: 0.1, flips: -1 }, "/flips"],
    ["flips not an integer", { n: 7, p: 0.1, flips: 1.5 }, "/flips"],
    ["flips over n", { n: 7, p: 0.1, flips: 8 }, "/flips"],
    ["t negative", { n: 7, p: 0.1, t: -1 }, "/t"],
    ["t over n", { n: 7, p: 0.1, t: 8 }, "/t"],
    ["t a boolean", { n: 7, p: 0.1, t: true }, "/t"],
    ["an unknown field", { n: 7, p: 0.1, dmin: 3 }, "/dmin"],
  ])("%s → 422 at the field", async (_name, body, pointer) => {
    expectFieldError(await call(body), pointer);
  });

  it("flips over n names n in the message", async () => {
    expectFieldError(await call({ n: 7, p: 0.1, flips: 8 }), "/flips", /n = 7/);
  });

  it("a number too large for a double (1e400 parses as Infinity) → 422 at /p, not a 500", async () => {
    expectFieldError(await call('{"n": 7, "p": 1e400}'), "/p");
  });

  it("n = 1e400 → 422 at /n", async () => {
    expectFieldError(await call('{"n": 1e400, "p": 0.1}'), "/n");
  });

  it("a body that is not an object → 422 at the root", async () => {
    expectFieldError(await call([7, 0.1]), "");
  });

  it("every bad field is listed at once", async () => {
    const p = expectProblem(await call({ n: 0, p: 2, t: -1 }), 422, "validation-failed");
    expect(p.errors!.map((e) => e.pointer)).toEqual(expect.arrayContaining(["/n", "/p", "/t"]));
  });
});
