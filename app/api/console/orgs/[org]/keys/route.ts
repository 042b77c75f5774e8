import { methods } from "@/lib/api/methods";
import { consoleRoute, json, readJson, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { requireRecentConfirmation } from "@/lib/auth/reauth";
import { createOrgKey, listOrgKeys, newKeyInput } from "@/lib/console/keys";

// Billing has no keys; the services narrow a developer to the keys they created.
const listKeys = consoleRoute(withSession(withOrgRole(["owner", "developer"], async (_req, { db, org, caller }) => json({ keys: await listOrgKeys(db, org, caller) }))));

const createKey = consoleRoute(
  sameOrigin(
    withSession(
      withOrgRole(["owner", "developer"], async (req, ctx) => {
        const input = await readJson(req, newKeyInput);
        // A live key spends real money; a test key does not, so only a live one asks for the password.
        if (input.mode === "live") requireRecentConfirmation(ctx);
        return json(await createOrgKey(ctx.db, ctx.org, ctx.caller, input), 201);
      }),
    ),
  ),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: listKeys, POST: createKey });
