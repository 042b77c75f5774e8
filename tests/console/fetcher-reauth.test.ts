import { afterEach, describe, expect, it, vi } from "vitest";
import { consoleFetch, setReauthHandler } from "@/lib/console-client/fetcher";
import { isProblem } from "@/lib/console-client/problem";

/** The server's refusal as lib/api/errors.ts renders it (status and type from its reauth-required entry). */
const refusal = () =>
  new Response(JSON.stringify({ type: "/problems/reauth-required", title: "Confirm your password first", status: 403, detail: "stale" }), {
    status: 403,
    headers: { "content-type": "application/problem+json" },
  });
const created = () => new Response(JSON.stringify({ key: "made" }), { status: 201, headers: { "content-type": "application/json" } });

let unregister: (() => void) | undefined;
afterEach(() => {
  unregister?.();
  unregister = undefined;
  vi.unstubAllGlobals();
});

function serve(...answers: (() => Response)[]) {
  const fetch = vi.fn(async () => answers.shift()!());
  vi.stubGlobal("fetch", fetch);
  return fetch;
}

describe("consoleFetch and reauth-required", () => {
  it("asks the handler, then sends the same request once more and resolves with its answer", async () => {
    const fetch = serve(refusal, created);
    const handler = vi.fn(async () => true);
    unregister = setReauthHandler(handler);
    await expect(consoleFetch("/api/console/orgs/o/keys", { method: "POST", body: { mode: "live" } })).resolves.toEqual({ key: "made" });
    expect(handler).toHaveBeenCalledTimes(1);
    expect(fetch).toHaveBeenCalledTimes(2);
    expect(fetch.mock.calls[1]).toEqual(fetch.mock.calls[0]);
  });

  it("declined: the call fails with the refusal and is not sent again", async () => {
    const fetch = serve(refusal);
    unregister = setReauthHandler(async () => false);
    const err = await consoleFetch("/x", { method: "POST" }).catch((e: unknown) => e);
    expect(isProblem(err, 403, "reauth-required")).toBe(true);
    expect(fetch).toHaveBeenCalledTimes(1);
  });

  it("retries once only: a second refusal is thrown", async () => {
    const fetch = serve(refusal, refusal);
    const handler = vi.fn(async () => true);
    unregister = setReauthHandler(handler);
    const err = await consoleFetch("/x", { method: "POST" }).catch((e: unknown) => e);
    expect(isProblem(err, 403, "reauth-required")).toBe(true);
    expect(handler).toHaveBeenCalledTimes(1);
    expect(fetch).toHaveBeenCalledTimes(2);
  });

  it("without a registered handler the refusal is thrown as it came", async () => {
    serve(refusal);
    const err = await consoleFetch("/x", { method: "POST" }).catch((e: unknown) => e);
    expect(isProblem(err, 403, "reauth-required")).toBe(true);
  });
});
