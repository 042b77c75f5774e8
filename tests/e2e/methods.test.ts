import { afterAll, beforeAll, describe, it } from "vitest";
import {
  checkPathTrick,
  checkRouteMethod,
  checkUnknownPath,
  expectProblemAnswer,
  METHODS,
  PATH_TRICKS,
  routeCases,
  UNKNOWN_PATHS,
} from "../helpers/method-matrix";
import { rawRequest } from "../helpers/raw-http";
import { startE2E, type E2E } from "./harness";

/**
 * The checks of tests/api/methods.test.ts against the production server (`next start`), where the front door
 * is installed by instrumentation.ts and Next.js itself routes, redirects and builds the fetch Requests.
 */
let e2e: E2E;
beforeAll(async () => {
  e2e = await startE2E();
});
afterAll(async () => {
  await e2e?.stop();
});

const send = (method: string, target: string, headers: Record<string, string> = {}) => rawRequest(e2e.port, method, target, { headers });

describe("/api on next start: every route × every method", () => {
  it.each(routeCases)("$pattern", async (c) => {
    for (const method of METHODS) await checkRouteMethod(send, c, method);
  });
});

describe("/api on next start: unknown paths and path tricks are 404 problems, never the HTML page or a redirect", () => {
  it.each(UNKNOWN_PATHS)("%s", (path) => checkUnknownPath(send, path));
  it.each(PATH_TRICKS)("%s", (path) => checkPathTrick(send, path));

  it("an action next-auth does not have", async () => {
    for (const method of ["GET", "POST"]) expectProblemAnswer(await send(method, "/api/auth/nonsense"), method, 404, "not-found");
  });
});
