import { beforeAll, describe, it } from "vitest";
import { expectFieldError, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const call = (body: unknown) => postJson("/api/v1/links/ber", body, auth);

describe("POST /links/ber: bad input", () => {
  it.each([
    ["modulation missing", { ebN0Db: 3 }, "/modulation"],
    ["an unknown modulation", { modulation: "fsk", ebN0Db: 3 }, "/modulation"],
    ["modulation in capitals", { modulation: "BPSK", ebN0Db: 3 }, "/modulation"],
    ["psk without order", { modulation: "psk", ebN0Db: 3 }, "/order"],
    ["qam without order", { modulation: "qam", ebN0Db: 3 }, "/order"],
    ["order 1", { modulation: "psk", order: 1, ebN0Db: 3 }, "/order"],
    ["order over 4096", { modulation: "qam", order: 8192, ebN0Db: 3 }, "/order"],
    ["order not an integer", { modulation: "psk", order: 8.5, ebN0Db: 3 }, "/order"],
    ["bpsk with order 4", { modulation: "bpsk", order: 4, ebN0Db: 3 }, "/order"],
    ["qpsk with order 8", { modulation: "qpsk", order: 8, ebN0Db: 3 }, "/order"],
    ["ebN0Db over 100", { modulation: "bpsk", ebN0Db: 101 }, "/ebN0Db"],
    ["ebN0Db under −50", { modulation: "bpsk", ebN0Db: -51 }, "/ebN0Db"],
    ["ebN0Db a string", { modulation: "bpsk", ebN0Db: "3" }, "/ebN0Db"],
    ["an empty sweep", { modulation: "bpsk", ebN0Db: [] }, "/ebN0Db"],
    ["targetBer 0", { modulation: "bpsk", targetBer: 0 }, "/targetBer"],
    ["targetBer ½", { modulation: "bpsk", targetBer: 0.5 }, "/targetBer"],
    ["targetBer negative", { modulation: "bpsk", targetBer: -1e-5 }, "/targetBer"],
    ["code n 0", { modulation: "bpsk", code: { n: 0, k: 1, dmin: 1 } }, "/code/n"],
    ["code n over 10^6", { modulation: "bpsk", code: { n: 1_000_001, k: 1, dmin: 1 } }, "/code/n"],
    ["code k missing", { modulation: "bpsk", code: { n: 7, dmin: 3 } }, "/code/k"],
    ["code k over n", { modulation: "bpsk", code: { n: 7, k: 8, dmin: 1 } }, "/code/k"],
    ["code dmin 0", { modulation: "bpsk", code: { n: 7, k: 4, dmin: 0 } }, "/code/dmin"],
    ["an unknown field in code", { modulation: "bpsk", code: { n: 7, k: 4, dmin: 3, t: 1 } }, "/code/t"],
    ["an unknown top-level field", { modulation: "bpsk", ebN0Db: 3, snr: 2 }, "/snr"],
  ])("%s → 422 at the field", async (_name, body, pointer) => {
    expectFieldError(await call(body), pointer);
  });

  it("a sweep over 1,000 points → /ebN0Db", async () => {
    expectFieldError(await call({ modulation: "bpsk", ebN0Db: new Array(1001).fill(3) }), "/ebN0Db");
  });

  it("a bad value inside a sweep → 422 pointing at that entry", async () => {
    expectFieldError(await call({ modulation: "bpsk", ebN0Db: [1, 2, 500] }), "/ebN0Db/2");
  });

  it("dmin above the Singleton bound n − k + 1 → /code/dmin, naming the bound", async () => {
    expectFieldError(await call({ modulation: "bpsk", code: { n: 7, k: 4, dmin: 5 } }), "/code/dmin", /Singleton/);
  });

  it("nothing to compute → 422 at the root naming the three options", async () => {
    expectFieldError(await call({ modulation: "bpsk" }), "", /`ebN0Db`.*`targetBer`.*`code`/);
  });

  it.each([
    ["psk order 6 (not a power of two)", { modulation: "psk", order: 6, ebN0Db: 3 }, /power of 2/],
    ["psk order 2048 (over the PSK maximum)", { modulation: "psk", order: 2048, ebN0Db: 3 }, /power of 2/],
    ["qam order 8 (not square)", { modulation: "qam", order: 8, ebN0Db: 3 }, /square/],
    ["qam order 32 (not square)", { modulation: "qam", order: 32, targetBer: 1e-5 }, /square/],
  ])("%s → 422 at /order with the reason", async (_name, body, message) => {
    expectFieldError(await call(body), "/order", message);
  });

  it("a target above the highest BER the formula can have → 422 at /targetBer (4096-QAM's nearest-neighbour formula never exceeds about 0.08)", async () => {
    expectFieldError(await call({ modulation: "qam", order: 4096, berFormula: "nearest-neighbour", targetBer: 0.4 }), "/targetBer", /never exceeds/);
  });
});
