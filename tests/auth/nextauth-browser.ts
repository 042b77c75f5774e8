import { createRequire } from "node:module";
import { NextRequest } from "next/server";
import { vi } from "vitest";
import { GET, POST } from "@/app/api/auth/[...nextauth]/route";
import { getDb } from "@/db";
import { readSession } from "@/lib/auth/session";
import { ORIGIN } from "./helpers";

/**
 * next-auth's real route handler outside Next.js: there is no request scope for next/headers, so headers() and
 * cookies() are answered from the request being handled. Importing this module installs that.
 */
const nextHeaders = createRequire(import.meta.url)("next/headers") as { headers: () => unknown; cookies: () => unknown };
let current: NextRequest | undefined;
vi.spyOn(nextHeaders, "headers").mockImplementation(async () => new Headers(current?.headers));
vi.spyOn(nextHeaders, "cookies").mockImplementation(async () => ({ getAll: () => current?.cookies.getAll() ?? [] }));

/** A browser's cookie jar on next-auth's route handler, enough for its CSRF and session cookies; `seen` is shown every answer. */
export class NextAuthBrowser {
  jar = new Map<string, string>();
  constructor(private readonly seen?: (res: Response) => Promise<void>) {}

  async call(method: "GET" | "POST", url: string, form?: Record<string, string>): Promise<Response> {
    const headers = new Headers({ host: "localhost", cookie: this.cookie() });
    if (form) headers.set("content-type", "application/x-www-form-urlencoded");
    current = new NextRequest(new URL(url, ORIGIN), { method, headers, body: form ? new URLSearchParams(form).toString() : undefined });
    const nextauth = current.nextUrl.pathname.replace(/^\/api\/auth\//, "").split("/");
    const res = await (method === "GET" ? GET : POST)(current, { params: Promise.resolve({ nextauth }) });
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(";");
      const i = pair!.indexOf("=");
      this.jar.set(pair!.slice(0, i), pair!.slice(i + 1));
    }
    await this.seen?.(res);
    return res;
  }

  async csrf(): Promise<string> {
    return ((await (await this.call("GET", "/api/auth/csrf")).json()) as { csrfToken: string }).csrfToken;
  }

  cookie = () => [...this.jar].map(([k, v]) => `${k}=${v}`).join("; ");

  session = async () => readSession(new Request(ORIGIN, { headers: { cookie: this.cookie() } }), await getDb());
}
