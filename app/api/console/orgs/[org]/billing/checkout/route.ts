import { methods } from "@/lib/api/methods";
import { BILLING_ROLES, consoleRoute, json, readJson, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { checkoutBody, orgCheckout } from "@/lib/console/billing";

const checkout = consoleRoute(
  sameOrigin(
    withSession(
      withOrgRole(BILLING_ROLES, async (req, { db, org, caller, origin }) => {
        const { plan } = await readJson(req, checkoutBody);
        return json(await orgCheckout(db, org, caller, plan, origin), 201);
      }),
    ),
  ),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ POST: checkout });
