import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import type { EmailConfig } from "next-auth/providers/email";
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from "vitest";
import { readMailbox, waitForMessage } from "@/fakes/mailbox";
import { authOptions, sendSignInLink } from "@/lib/auth/options";
import { sendMail } from "@/lib/mail/send";
import { api, expectProblem } from "../helpers/api";
import { linksIn, startMailbox } from "./helpers";

let mailbox: Awaited<ReturnType<typeof startMailbox>>;
beforeAll(async () => {
  mailbox = await startMailbox();
});
afterAll(() => mailbox.stop());
afterEach(() => {
  vi.unstubAllEnvs();
});

describe("fake SMTP server", () => {
  it("stores each message as JSON with id, to, from, subject, text, html and receipt time", async () => {
    await sendMail({ to: "Stored@Example.com", subject: "Stored", text: "plain body", html: "<p>html body</p>" });
    const m = await waitForMessage(mailbox.dir, "stored@example.com");
    expect(m).toEqual({
      id: expect.stringMatching(/^[0-9a-f-]{36}$/),
      to: expect.stringMatching(/^stored@example\.com$/i),
      from: expect.stringContaining("Paritas"),
      subject: "Stored",
      text: expect.stringContaining("plain body"),
      html: expect.stringContaining("<p>html body</p>"),
      receivedAt: expect.stringMatching(/^\d{4}-\d\d-\d\dT/),
    });
    const files = readdirSync(mailbox.dir);
    expect(files.every((f) => f.endsWith(".json"))).toBe(true);
    const onDisk = files.map((f) => JSON.parse(readFileSync(join(mailbox.dir, f), "utf8")) as { id: string });
    expect(onDisk.map((x) => x.id)).toContain(m.id);
  });

  it("readMailbox lists the newest message first; a missing directory is an empty mailbox", async () => {
    await sendMail({ to: "order@example.com", subject: "first", text: "1" });
    await waitForMessage(mailbox.dir, "order@example.com");
    await sendMail({ to: "order@example.com", subject: "second", text: "2" });
    await vi.waitFor(async () => expect((await readMailbox(mailbox.dir)).filter((m) => m.to === "order@example.com")).toHaveLength(2));
    const subjects = (await readMailbox(mailbox.dir)).filter((m) => m.to === "order@example.com").map((m) => m.subject);
    expect(subjects).toEqual(["second", "first"]);
    expect(await readMailbox(join(mailbox.dir, "absent"))).toEqual([]);
  });

  it("listens on the loopback interface only", async () => {
    const { createConnection } = await import("node:net");
    const { networkInterfaces } = await import("node:os");
    const external = Object.values(networkInterfaces()).flat().find((i) => i && i.family === "IPv4" && !i.internal);
    if (!external) return; // no non-loopback interface on this machine to try
    const refused = await new Promise<boolean>((resolve) => {
      const s = createConnection({ host: external.address, port: mailbox.port });
      s.once("connect", () => (s.destroy(), resolve(false)));
      s.once("error", () => resolve(true));
    });
    expect(refused).toBe(true);
  });
});

describe("e-mail sign-in link", () => {
  const url = "http://localhost/api/auth/callback/email?callbackUrl=%2Fconsole&token=abc123&email=link%40example.com";

  it("sendVerificationRequest delivers our own message with the link to the mailbox", async () => {
    const provider = authOptions().providers.find((p) => p.id === "email") as EmailConfig;
    const send = provider.options.sendVerificationRequest!;
    expect(send).toBe(sendSignInLink);
    await send({ identifier: "link@example.com", url, expires: new Date(), provider, token: "abc123", theme: {} });
    const m = await waitForMessage(mailbox.dir, "link@example.com");
    expect(m.subject).toBe("Your Paritas sign-in link");
    expect(linksIn(m.text)).toContain(url);
    expect(m.html).toContain(url.replace(/&/g, "&amp;"));
    expect(m.text).toMatch(/30 minutes/);
  });

  it("an SMTP server that cannot be reached makes sending fail (next-auth then reports EmailSignin)", async () => {
    vi.stubEnv("PARITAS_SMTP_URL", "smtp://127.0.0.1:1");
    await expect(sendSignInLink({ identifier: "nowhere@example.com", url })).rejects.toThrow();
  });
});

describe("GET /api/console/dev/mailbox", () => {
  it("lists the messages, newest first, in development", async () => {
    vi.stubEnv("PARITAS_MAILBOX_DIR", mailbox.dir);
    await sendMail({ to: "route@example.com", subject: "via route", text: "open http://localhost/somewhere" });
    await waitForMessage(mailbox.dir, "route@example.com");
    const res = await api().get("/api/console/dev/mailbox");
    expect(res.status).toBe(200);
    expect(res.headers["cache-control"]).toBe("no-store");
    const messages = res.body.messages as { to: string; subject: string; receivedAt: string }[];
    expect(messages[0]).toMatchObject({ to: "route@example.com", subject: "via route" });
    const times = messages.map((m) => m.receivedAt);
    expect(times).toEqual([...times].sort().reverse());
  });

  it("is 404 in production, unless PARITAS_DEV_MAILBOX=1", async () => {
    vi.stubEnv("PARITAS_MAILBOX_DIR", mailbox.dir);
    vi.stubEnv("NODE_ENV", "production");
    expectProblem(await api().get("/api/console/dev/mailbox"), 404, "not-found");
    vi.stubEnv("PARITAS_DEV_MAILBOX", "1");
    expect((await api().get("/api/console/dev/mailbox")).status).toBe(200);
  });
});
