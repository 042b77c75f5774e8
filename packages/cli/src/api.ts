import { createParitasClient } from "../../client/src/index.js";
import type { paths } from "../../client/src/paritas.js";

/** Calls to the Paritas API through the typed client, with the failures a CI run must tell apart. */

export const DEFAULT_API = "http://localhost:3000/api/v1";

export type ClaimRequest = paths["/claims"]["post"]["requestBody"]["content"]["application/json"];
type DecidedClaim = paths["/claims/{id}"]["get"]["responses"][200]["content"]["application/json"];
export type Verdict = DecidedClaim["verdict"];
export type PlanRequest = paths["/tests/plan"]["post"]["requestBody"]["content"]["application/json"];
export type Plan = paths["/tests/plan"]["post"]["responses"][200]["content"]["application/json"];

/**
 * A claim as the API answers it. A simulated claim is `pending`, with no rate or interval yet, until its job
 * decides it, and links its simulation; the generated types predate that mode, so these fields are widened here.
 */
export type ClaimView = Omit<DecidedClaim, "verdict" | "mode" | "rate" | "interval"> & {
  verdict: Verdict | "pending";
  mode: string;
  rate: number | null;
  interval: DecidedClaim["interval"] | null;
  simulation?: string;
};

export interface FieldProblem {
  pointer: string;
  message: string;
}

/** The API could not be reached, or refused the key: nothing it says can be trusted as a verdict (exit 3). */
export class ApiUnavailable extends Error {}

/** The API refused one request as invalid (4xx other than the key): the claim or plan needs fixing. */
export class RequestRefused extends Error {
  constructor(
    message: string,
    readonly status: number,
    readonly fields: FieldProblem[],
  ) {
    super(message);
  }
}

interface Problem {
  title?: string;
  detail?: string;
  errors?: FieldProblem[];
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const RETRIES_ON_429 = 3;

export class Api {
  private readonly client;

  constructor(
    readonly base: string,
    key: string,
  ) {
    this.client = createParitasClient({ baseUrl: base.replace(/\/+$/, ""), key });
  }

  /** A call through the client: network failures, refused keys and server faults become ApiUnavailable; 429 waits and retries. */
  private async call<T>(what: string, send: () => Promise<{ data?: T; error?: unknown; response: Response }>): Promise<{ data: T; response: Response }> {
    for (let attempt = 0; ; attempt++) {
      let out: { data?: T; error?: unknown; response: Response };
      try {
        out = await send();
      } catch (e) {
        const cause = (e as { cause?: { code?: string } }).cause?.code;
        throw new ApiUnavailable(`Cannot reach the Paritas API at ${this.base}${cause ? ` (${cause})` : ""}: is the address right and the server up?`);
      }
      const { response } = out;
      if (out.data !== undefined && response.ok) return { data: out.data, response };
      const problem = (typeof out.error === "object" && out.error !== null ? out.error : {}) as Problem;
      const said = problem.detail ?? problem.title ?? response.statusText;
      if (response.status === 429 && attempt < RETRIES_ON_429) {
        await sleep(1000 * Math.min(60, Number(response.headers.get("retry-after")) || 1));
        continue;
      }
      if (response.status === 401) throw new ApiUnavailable(`The Paritas API at ${this.base} refused the key (401): ${said}`);
      if (response.status === 403) throw new ApiUnavailable(`The Paritas API at ${this.base} refused the key for ${what} (403): ${said}`);
      if (response.status === 402 || response.status === 429) throw new ApiUnavailable(`The Paritas API at ${this.base} refused ${what} (${response.status}): ${said}`);
      if (response.status >= 500 || !response.headers.get("content-type")?.includes("json")) {
        throw new ApiUnavailable(`The Paritas API at ${this.base} failed on ${what} (${response.status}): ${said}`);
      }
      throw new RequestRefused(said, response.status, problem.errors ?? []);
    }
  }

  /** POST /claims: a decided claim (201), or a pending one (202) with where to follow it. */
  async submitClaim(body: unknown): Promise<{ claim: ClaimView; id: string }> {
    // Evidence is passed as the file gives it (the API checks it); simulated evidence is newer than the generated types.
    const { data, response } = await this.call("a claim", () => this.client.POST("/claims", { body: body as ClaimRequest }));
    const claim = data as ClaimView;
    const location = response.headers.get("location");
    return { claim, id: location ? decodeURIComponent(location.replace(/\/+$/, "").split("/").pop()!) : claim.id };
  }

  /** GET /claims/{id}. */
  async claim(id: string): Promise<ClaimView> {
    const { data } = await this.call("a claim", () => this.client.GET("/claims/{id}", { params: { path: { id } } }));
    return data as ClaimView;
  }

  /** POST /tests/plan. */
  async plan(body: PlanRequest): Promise<Plan> {
    return (await this.call("a test plan", () => this.client.POST("/tests/plan", { body }))).data;
  }
}
