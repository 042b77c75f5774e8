import { beforeAll, describe, expect, it } from "vitest";
import { expectFieldError, postJson } from "../helpers/api";
import { makeOrgWithKey } from "../helpers/fixtures";

let auth: string;
beforeAll(async () => {
  ({ auth } = await makeOrgWithKey({ scopes: ["compute"] }));
});

const call = (body: unknown) => postJson("/api/v1/capacity", body, auth);

describe("POST /capacity: bad input", () => {
  it.each([
    ["channel missing", { p: 0.1 }, "/channel"],
    ["an unknown channel", { channel: "rayleigh", snrDb: 3 }, "/channel"],
    ["channel not a string", { channel: 1, p: 0.1 }, "/channel"],
    ["BSC p missing", { channel: "bsc" }, "/p"],
    ["BSC p over 1", { channel: "bsc", p: 1.5 }, "/p"],
    ["BSC p negative", { channel: "bsc", p: -0.1 }, "/p"],
    ["BSC p a string", { channel: "bsc", p: "0.1" }, "/p"],
    ["BSC rate 0", { channel: "bsc", p: 0.1, rate: 0 }, "/rate"],
    ["BSC rate over 1", { channel: "bsc", p: 0.1, rate: 1.2 }, "/rate"],
    ["BSC with a field of another channel", { channel: "bsc", p: 0.1, snrDb: 3 }, "/snrDb"],
    ["BEC erasure over 1", { channel: "bec", erasure: 1.5 }, "/erasure"],
    ["BEC erasure missing", { channel: "bec" }, "/erasure"],
    ["BEC with p instead of erasure", { channel: "bec", erasure: 0.1, p: 0.1 }, "/p"],
    ["AWGN snrDb over 100", { channel: "awgn", snrDb: 101 }, "/snrDb"],
    ["AWGN snrDb under −100", { channel: "awgn", snrDb: -101 }, "/snrDb"],
    ["AWGN snr negative", { channel: "awgn", snr: -1 }, "/snr"],
    ["AWGN snr over 1e10", { channel: "awgn", snr: 2e10 }, "/snr"],
    ["AWGN bandwidth 0", { channel: "awgn", snrDb: 3, bandwidthHz: 0 }, "/bandwidthHz"],
    ["AWGN bandwidth over 1e15", { channel: "awgn", snrDb: 3, bandwidthHz: 1e16 }, "/bandwidthHz"],
    ["AWGN rate negative", { channel: "awgn", snrDb: 3, rate: -0.5 }, "/rate"],
    ["AWGN an unknown rate unit", { channel: "awgn", rate: 0.5, rateUnit: "bits per symbol" }, "/rateUnit"],
    ["BSC a rate per real dimension", { channel: "bsc", p: 0.1, rate: 0.5, rateUnit: "bits per real dimension" }, "/rateUnit"],
    ["BPSK rate 0 (its limit needs a rate above 0)", { channel: "bpsk-awgn", rate: 0 }, "/rate"],
    ["AWGN rate over 16", { channel: "awgn", snrDb: 3, rate: 17 }, "/rate"],
    ["AWGN ebN0Db without rate", { channel: "awgn", ebN0Db: 3 }, "/rate"],
    ["BPSK rate 1 (must be below 1)", { channel: "bpsk-awgn", ebN0Db: 3, rate: 1 }, "/rate"],
    ["BPSK ebN0Db without rate", { channel: "bpsk-awgn", ebN0Db: 3 }, "/rate"],
    ["BPSK esN0Db a string", { channel: "bpsk-awgn", esN0Db: "3" }, "/esN0Db"],
    ["an unknown field", { channel: "bpsk-awgn", esN0Db: 3, modulation: "bpsk" }, "/modulation"],
  ])("%s → 422 at the field", async (_name, body, pointer) => {
    expectFieldError(await call(body), pointer);
  });

  it("AWGN with none of snrDb, snr, ebN0Db and no rate → 422 naming all three and the rate", async () => {
    expectFieldError(await call({ channel: "awgn" }), "", /`snrDb`.*`snr`.*`ebN0Db`.*`rate`/);
  });

  it("AWGN with two ways of giving the S/N → 422 at the second one", async () => {
    expectFieldError(await call({ channel: "awgn", snrDb: 3, snr: 2 }), "/snr", /exactly one/);
  });

  it("BPSK input with both esN0Db and ebN0Db → 422", async () => {
    expectFieldError(await call({ channel: "bpsk-awgn", esN0Db: 3, ebN0Db: 3, rate: 0.5 }), "/ebN0Db", /exactly one/);
  });

  it("BPSK input with neither esN0Db nor ebN0Db → 422", async () => {
    expectFieldError(await call({ channel: "bpsk-awgn" }), "", /`esN0Db`.*`ebN0Db`/);
  });

  it("an empty object → 422 at /channel", async () => {
    const p = expectFieldError(await call({}), "/channel");
    expect(p.errors!.length).toBeGreaterThanOrEqual(1);
  });
});
