import type { useRouter } from "next/navigation";
import { consoleFetch } from "@/lib/console-client/fetcher";
import { toProblem } from "@/lib/console-client/problem";

/** What the auth forms need from a console API answer: success, or the problem's detail and field errors. */
export type Outcome = { ok: true } | { ok: false; status: number; detail: string; fields: Record<string, string> };

const FALLBACK = "Something went wrong on our side. Try again in a moment.";

/** POST JSON to a console route; a problem answer becomes its detail and a field → message map. */
export async function postJson(path: string, body: unknown): Promise<Outcome> {
  try {
    await consoleFetch(path, { method: "POST", body });
    return { ok: true };
  } catch (err) {
    const p = toProblem(err);
    // "/email" → "email": the forms have flat bodies.
    const fields = Object.fromEntries((p.errors ?? []).map((e) => [e.pointer.replace(/^\//, ""), e.message]));
    return { ok: false, status: p.status, detail: p.status >= 500 ? FALLBACK : (p.detail ?? p.title), fields };
  }
}

/** Where to go after signing in: a path on this site (next-auth passes it as a full URL); anything else is /console. */
export function safeReturnPath(value: string | undefined): string {
  if (!value) return "/console";
  try {
    const url = new URL(value, window.location.origin);
    return url.origin === window.location.origin ? `${url.pathname}${url.search}${url.hash}` : "/console";
  } catch {
    return "/console";
  }
}

/**
 * Go to the check-mail page at its top. The router would only scroll the new page's own segment
 * into view, which leaves the site header above the fold.
 */
export function showCheckMail(router: ReturnType<typeof useRouter>, query: URLSearchParams): void {
  window.scrollTo(0, 0);
  router.push(`/signin/check-mail?${query}`, { scroll: false });
}

export const looksLikeEmail = (s: string) => /^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(s);
