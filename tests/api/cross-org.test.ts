import { beforeAll, describe, expect, it, vi } from "vitest";
import { findOrgById } from "@/db/queries/orgs";
import { insertBillingAccount, setOrgPlan } from "@/db/queries/billing";
import { nowIso } from "@/db";
import { api, postJson } from "../helpers/api";
import { billingStandInForThisFile, payOnPage } from "../helpers/billing";
import { consoleCall, makeConsoleOrg, type ConsoleFixture } from "../helpers/console";
import { until } from "../helpers/jobs";

vi.mock(import("@/lib/mail/send"), async (orig) => ({ ...(await orig()), sendMail: vi.fn(async () => {}) }));

/**
 * Another organisation's identifier answers exactly like one that does not exist (status, problem type,
 * title, and detail apart from the id), so an id never tells whether it belongs to someone else.
 * The org's own id is asked for first each time, so a route that answered 404 for everything would fail.
 */
const h = billingStandInForThisFile({ webhooks: true });

const MISSING_SIM = "sim-0000000000000000";
const MISSING_CLAIM = "clm-0000000000000000";
const MISSING_INVOICE = "in_000000000000000000000000";

interface Answer {
  status: number;
  text: string;
  headers: Record<string, string>;
}
/** What may differ between two 404s: nothing but the id (and the request id). */
function shape(res: Answer, id: string) {
  expect(res.headers["content-type"]).toMatch(/^application\/problem\+json/);
  const body = JSON.parse(res.text) as { type: string; title: string; status: number; detail: string };
  return { status: res.status, type: body.type, title: body.title, detail: body.detail.split(id).join("{id}") };
}
async function sameAsMissing(ask: (id: string) => PromiseLike<Answer>, foreignId: string, missingId: string) {
  const foreign = shape(await ask(foreignId), foreignId);
  const missing = shape(await ask(missingId), missingId);
  expect(foreign).toEqual(missing);
  expect(foreign.status).toBe(404);
  expect(foreign.type).toBe("/problems/not-found");
}

let fx: ConsoleFixture;
let ownClaim: string;
let foreignClaim: string;
beforeAll(async () => {
  fx = await makeConsoleOrg();
  const claim = { label: "cross-org", target: { metric: "ber", atMost: 1e-9 }, evidence: { mode: "measured", trials: 3e9, errors: 0 } };
  const mine = await postJson("/api/v1/claims", claim, `Bearer ${fx.keys.owner.key}`);
  const theirs = await postJson("/api/v1/claims", claim, `Bearer ${fx.otherKey.key}`);
  expect([mine.status, theirs.status]).toEqual([201, 201]);
  ownClaim = mine.body.id;
  foreignClaim = theirs.body.id;
});

describe("with an API key", () => {
  const bearer = () => `Bearer ${fx.keys.owner.key}`;
  const get = (path: string) => api().get(path).set("authorization", bearer());

  it("GET /simulations/{id}", async () => {
    expect((await get(`/api/v1/simulations/${fx.simulations.done}`)).status).toBe(200);
    await sameAsMissing((id) => get(`/api/v1/simulations/${id}`), fx.otherSimulation, MISSING_SIM);
  });

  it("GET /simulations/{id}/events", async () => {
    const own = await get(`/api/v1/simulations/${fx.simulations.done}/events`);
    expect(own.status).toBe(200);
    expect(own.headers["content-type"]).toMatch(/^text\/event-stream/);
    await sameAsMissing((id) => get(`/api/v1/simulations/${id}/events`), fx.otherSimulation, MISSING_SIM);
  });

  it("DELETE /simulations/{id}, and the other org's simulation is left running", async () => {
    await sameAsMissing((id) => api().delete(`/api/v1/simulations/${id}`).set("authorization", bearer()), fx.otherSimulation, MISSING_SIM);
    const theirs = await api().get(`/api/v1/simulations/${fx.otherSimulation}`).set("authorization", `Bearer ${fx.otherKey.key}`);
    expect(theirs.status).toBe(200);
    expect(theirs.body.status).toBe("queued");
  });

  it("GET /claims/{id}", async () => {
    expect((await get(`/api/v1/claims/${ownClaim}`)).status).toBe(200);
    await sameAsMissing((id) => get(`/api/v1/claims/${id}`), foreignClaim, MISSING_CLAIM);
  });
});

describe("with a session", () => {
  const sims = () => `/api/console/orgs/${fx.org.slug}/simulations`;

  it("GET and DELETE …/simulations/{id}", async () => {
    expect((await consoleCall("GET", `${sims()}/${fx.simulations.done}`, { cookie: fx.owner.cookie })).status).toBe(200);
    await sameAsMissing((id) => consoleCall("GET", `${sims()}/${id}`, { cookie: fx.owner.cookie }), fx.otherSimulation, MISSING_SIM);
    await sameAsMissing((id) => consoleCall("DELETE", `${sims()}/${id}`, { cookie: fx.owner.cookie }), fx.otherSimulation, MISSING_SIM);
  });

  it("GET …/simulations/{id}/events", async () => {
    const own = await consoleCall("GET", `${sims()}/${fx.simulations.done}/events`, { cookie: fx.owner.cookie });
    expect(own.status).toBe(200);
    await sameAsMissing((id) => consoleCall("GET", `${sims()}/${id}/events`, { cookie: fx.owner.cookie }), fx.otherSimulation, MISSING_SIM);
  });

  it("GET …/billing/invoices/{id} and …/document: another org's invoice is no invoice, with or without a billing account", async () => {
    // The fixture org buys Beacon through the stand-in's checkout and a period is closed: it has an invoice.
    await setOrgPlan(fx.db, fx.org.id, "lantern");
    const checkout = await consoleCall("POST", `/api/console/orgs/${fx.org.slug}/billing/checkout`, { cookie: fx.owner.cookie, body: { plan: "beacon" } });
    expect(checkout.status, checkout.text).toBe(201);
    await payOnPage(checkout.body.url, "4242424242424242");
    await until(async () => (await findOrgById(fx.db, fx.org.id))!.plan, (p) => p === "beacon", 10_000);
    const list = async () => (await consoleCall("GET", `/api/console/orgs/${fx.org.slug}/billing/invoices`, { cookie: fx.owner.cookie })).body.items as { id: string }[];
    const account = await fx.db.selectFrom("billing_accounts").selectAll().where("org_id", "=", fx.org.id).executeTakeFirstOrThrow();
    await h.control(`subscriptions/${account.subscription_id}/close-period`);
    const invoice = (await until(list, (items) => items.length > 0, 10_000))[0]!.id;

    const base = `/api/console/orgs/${fx.org.slug}/billing/invoices`;
    expect((await consoleCall("GET", `${base}/${invoice}`, { cookie: fx.billing.cookie })).status).toBe(200);
    expect((await consoleCall("GET", `${base}/${invoice}/document?format=csv`, { cookie: fx.billing.cookie })).status).toBe(200);

    const theirs = `/api/console/orgs/${fx.other.slug}/billing/invoices`;
    const asOther = (path: string) => consoleCall("GET", path, { cookie: fx.otherOwner.cookie });
    for (const step of ["no billing account", "an account of its own"]) {
      if (step === "an account of its own") {
        const customer = await h.stripe.customers.create({ name: fx.other.name });
        await insertBillingAccount(fx.db, fx.other.id, customer.id, nowIso());
      }
      await sameAsMissing((id) => asOther(`${theirs}/${id}`), invoice, MISSING_INVOICE);
      await sameAsMissing((id) => asOther(`${theirs}/${id}/document?format=pdf`), invoice, MISSING_INVOICE);
      await sameAsMissing((id) => asOther(`${theirs}/${id}/document?format=csv`), invoice, MISSING_INVOICE);
    }
  });
});
