import { consoleRoute, json, readJson, sameOrigin, withOrgRole, withSession } from "@/lib/auth/guard";
import { createOrgKey, listOrgKeys, newKeyInput } from "@/lib/console/keys";

// Billing has no keys; the services narrow a developer to the keys they created.
export const GET = consoleRoute(withSession(withOrgRole(["owner", "developer"], async (_req, { db, org, caller }) => json({ keys: await listOrgKeys(db, org, caller) }))));

export const POST = consoleRoute(
  sameOrigin(
    withSession(
      withOrgRole(["owner", "developer"], async (req, { db, org, caller }) => {
        const input = await readJson(req, newKeyInput);
        return json(await createOrgKey(db, org, caller, input), 201);
      }),
    ),
  ),
);
