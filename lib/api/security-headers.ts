/**
 * The security headers of every response, in one place (OWASP Secure Headers Project; OWASP API Security
 * Top 10 2023, API8 "security misconfiguration"). proxy.ts applies them to pages, lib/api/methods.ts and the
 * front door to everything under /api, app/docs/route.ts to the API reference.
 */

/** Features the product never uses, switched off for the page and every frame it could embed. */
const PERMISSIONS_POLICY = [
  "accelerometer",
  "autoplay",
  "camera",
  "display-capture",
  "geolocation",
  "gyroscope",
  "magnetometer",
  "microphone",
  "midi",
  "payment",
  "serial",
  "usb",
  "xr-spatial-tracking",
]
  .map((f) => `${f}=()`)
  .join(", ");

/** Two years: the preload list's minimum is one; the browser refreshes it on every visit. */
const HSTS = "max-age=63072000; includeSubDomains";

/** The headers every response carries. HSTS only when the public origin (NEXTAUTH_URL) is https: over plain http a browser ignores it and a local demo must not pin itself to https. */
export function baseSecurityHeaders(): Record<string, string> {
  const headers: Record<string, string> = {
    "x-content-type-options": "nosniff",
    // Other origins (the payment page, links out of the docs) learn our origin only, never a path with an org, a token or a query;
    // stricter policies would also turn the Origin header of some same-site requests into "null".
    "referrer-policy": "strict-origin-when-cross-origin",
    "permissions-policy": PERMISSIONS_POLICY,
    // For browsers that predate CSP's frame-ancestors.
    "x-frame-options": "DENY",
  };
  if (process.env.NEXTAUTH_URL?.startsWith("https:")) headers["strict-transport-security"] = HSTS;
  return headers;
}

const policy = (directives: Record<string, string>) =>
  Object.entries(directives)
    .map(([k, v]) => `${k} ${v}`)
    .join("; ");

/** API answers are data, never a document: nothing may load from them or frame them. */
export const API_CSP = policy({ "default-src": "'none'", "frame-ancestors": "'none'" });

/** A fresh nonce: 128 random bits, base64. */
export function newNonce(): string {
  return btoa(String.fromCharCode(...crypto.getRandomValues(new Uint8Array(16))));
}

const isDev = () => process.env.NODE_ENV === "development";

/** What every page shares; only script-src differs between the app's pages and the API reference. */
const pageDirectives = {
  "default-src": "'self'",
  // React renders style attributes into the server HTML (style={…}, recharts' SVG), which CSP counts as inline styles;
  // styles cannot run script, so allowing them inline keeps the scripts' nonce the real barrier.
  "style-src": "'self' 'unsafe-inline'",
  "img-src": "'self' data: blob:",
  "font-src": "'self'",
  "connect-src": "'self'",
  "object-src": "'none'",
  "base-uri": "'self'",
  // The console's checkout leaves for the payment page by window.location, not by a form.
  "form-action": "'self'",
  "frame-ancestors": "'none'",
};

/**
 * The policy of the app's pages: scripts only with this request's nonce (Next.js reads it from the request's
 * Content-Security-Policy header and puts it on its own scripts) and what those load ('strict-dynamic').
 * React's development build evaluates code for its error overlay, so 'unsafe-eval' in development only.
 */
export function pageCsp(nonce: string): string {
  return policy({ ...pageDirectives, "script-src": `'self' 'nonce-${nonce}' 'strict-dynamic'${isDev() ? " 'unsafe-eval'" : ""}` });
}

/** The API reference's policy: its own script file and its inline start-up script, by hash (the page is the same for everyone). */
export function docsCsp(scriptHashes: readonly string[]): string {
  return policy({ ...pageDirectives, "script-src": ["'self'", ...scriptHashes.map((h) => `'sha256-${h}'`)].join(" ") });
}

/**
 * An API answer with the headers every response carries and the API's own policy; a header the answer already
 * has is kept. Some responses (Response.redirect) have immutable headers: those are copied into a new one.
 */
export function withSecurityHeaders(res: Response): Response {
  const headers = { ...baseSecurityHeaders(), "content-security-policy": API_CSP };
  const add = (r: Response) => {
    for (const [k, v] of Object.entries(headers)) if (!r.headers.has(k)) r.headers.set(k, v);
    return r;
  };
  try {
    return add(res);
  } catch {
    return add(new Response(res.body, { status: res.status, statusText: res.statusText, headers: res.headers }));
  }
}
