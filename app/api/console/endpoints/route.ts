import { consoleRoute, json, withSession } from "@/lib/auth/guard";
import { endpointCatalogue } from "@/lib/console/account";

export const GET = consoleRoute(withSession(async () => json({ endpoints: endpointCatalogue() })));
