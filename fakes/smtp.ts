import { randomUUID } from "node:crypto";
import { mkdir, rename, writeFile } from "node:fs/promises";
import type { AddressInfo } from "node:net";
import { join, resolve } from "node:path";
import { pathToFileURL } from "node:url";
import { simpleParser } from "mailparser";
import { SMTPServer } from "smtp-server";
import { mailboxDir, type StoredMessage } from "./mailbox";

/**
 * A stand-in for a mail provider in development and tests: an SMTP server on the loopback
 * interface, without authentication or TLS, that writes every message it accepts to a directory
 * as JSON (fakes/mailbox.ts reads them back; the console shows them at /console/dev/mailbox).
 */
export interface FakeSmtp {
  port: number;
  dir: string;
  close(): Promise<void>;
}

export const fakeSmtpPort = () => Number(process.env.PARITAS_FAKE_SMTP_PORT ?? 2525);

let seq = 0;

/** Start the server; port 0 picks a free port (tests). */
export async function startFakeSmtp(opts: { port?: number; dir?: string } = {}): Promise<FakeSmtp> {
  const dir = resolve(opts.dir ?? mailboxDir());
  await mkdir(dir, { recursive: true });

  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["AUTH", "STARTTLS"],
    logger: false,
    onData(stream, session, done) {
      simpleParser(stream)
        .then(async (mail) => {
          const received = new Date();
          const message: StoredMessage = {
            id: randomUUID(),
            // The envelope names every recipient, Bcc included, which the headers may not.
            to: session.envelope.rcptTo.map((r) => r.address).join(", "),
            from: mail.from?.text ?? (session.envelope.mailFrom ? session.envelope.mailFrom.address : ""),
            subject: mail.subject ?? "",
            text: mail.text ?? "",
            html: mail.html || null,
            receivedAt: received.toISOString(),
          };
          // Time first, so that file names sort by receipt; written aside and renamed, so readers never see half a file.
          const name = `${message.receivedAt.replace(/[:.]/g, "-")}-${String(++seq).padStart(6, "0")}-${message.id}.json`;
          await writeFile(join(dir, `${name}.partial`), JSON.stringify(message, null, 2));
          await rename(join(dir, `${name}.partial`), join(dir, name));
          done();
        })
        .catch((err: Error) => done(err));
    },
  });

  await new Promise<void>((ok, fail) => {
    server.once("error", fail);
    server.listen(opts.port ?? fakeSmtpPort(), "127.0.0.1", () => {
      server.off("error", fail);
      ok();
    });
  });
  server.on("error", (err) => console.error("fake SMTP:", err.message));
  const { port } = server.server.address() as AddressInfo;
  return { port, dir, close: () => new Promise<void>((ok) => server.close(() => ok())) };
}

// npm run fake:smtp
if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  const smtp = await startFakeSmtp();
  console.log(`fake SMTP listening on 127.0.0.1:${smtp.port}; messages go to ${smtp.dir}`);
}
