import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { startFakeSmtp, type FakeSmtp } from "@/fakes/smtp";
import { postJson } from "../helpers/api";

// bcrypt at cost 4 keeps the suite fast; production always uses 10 (lib/auth/passwords.ts).
process.env.PARITAS_BCRYPT_COST = "4";

/** The origin the test adapter gives every request (tests/helpers/app.ts). */
export const ORIGIN = "http://localhost";

/** POST JSON as the console's own pages do: with the app's Origin. */
export const postFromConsole = (path: string, body: unknown, headers: Record<string, string> = {}) =>
  postJson(path, body, undefined, { origin: ORIGIN, ...headers });

/** A fake SMTP server on a free port with its own mailbox directory; outgoing mail is pointed at it. */
export async function startMailbox(): Promise<FakeSmtp & { stop(): Promise<void> }> {
  const dir = mkdtempSync(join(tmpdir(), "paritas-mailbox-"));
  const smtp = await startFakeSmtp({ port: 0, dir });
  process.env.PARITAS_SMTP_URL = `smtp://127.0.0.1:${smtp.port}`;
  return {
    ...smtp,
    async stop() {
      await smtp.close();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** The links in a message's text. */
export const linksIn = (text: string) => text.match(/https?:\/\/[^\s<>"]+/g) ?? [];
