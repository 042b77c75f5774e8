import { devMailboxEnabled, readMailbox } from "@/fakes/mailbox";
import { ApiError } from "@/lib/api/errors";
import { methods } from "@/lib/api/methods";
import { consoleRoute, json } from "@/lib/auth/guard";

/** GET /api/console/dev/mailbox → the fake SMTP server's messages, newest first (development only). */
const readMailboxRoute = consoleRoute(async () => {
  if (!devMailboxEnabled()) throw new ApiError("not-found", "There is no mailbox on this server.");
  return json({ messages: await readMailbox() });
});

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: readMailboxRoute });
