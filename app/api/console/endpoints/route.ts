import { methods } from "@/lib/api/methods";
import { consoleRoute, json, withSession } from "@/lib/auth/guard";
import { endpointCatalogue } from "@/lib/console/account";

const listEndpoints = consoleRoute(withSession(async () => json({ endpoints: endpointCatalogue() })));

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: listEndpoints });
