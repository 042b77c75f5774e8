import { createHash } from "node:crypto";
import { ApiReference } from "@scalar/nextjs-api-reference";
import { markDataUri } from "@/components/mark";
import { baseSecurityHeaders, docsCsp } from "@/lib/api/security-headers";

/*
 * The interactive API reference over the generated OpenAPI document.
 *
 * Everything it loads comes from this app: the script is copied into public/vendor/ by
 * scripts/vendor-assets.mjs (predev / prebuild / postinstall), the fonts are our own files in
 * public/fonts/, and every feature that would call a third-party host is switched off:
 * default web fonts, telemetry, the developer toolbar (its share button uploads the document),
 * the hosted assistant, and the "open in hosted client" button. No proxyUrl is set, so "try it"
 * requests go straight to this origin.
 *
 * The page is the same for every visitor, so its policy allows its inline start-up script by hash
 * (a route handler gets no nonce from Next.js) and the script file by 'self'.
 */

const fontFaces = [
  ["Paritas Sans", "ibm-plex-sans-latin-400-normal.woff2", 400, "normal"],
  ["Paritas Sans", "ibm-plex-sans-latin-400-italic.woff2", 400, "italic"],
  ["Paritas Sans", "ibm-plex-sans-latin-500-normal.woff2", 500, "normal"],
  ["Paritas Sans", "ibm-plex-sans-latin-600-normal.woff2", 600, "normal"],
  ["Paritas Mono", "ibm-plex-mono-latin-400-normal.woff2", 400, "normal"],
  ["Paritas Mono", "ibm-plex-mono-latin-500-normal.woff2", 500, "normal"],
] as const;

const customCss = `
${fontFaces
  .map(
    ([family, file, weight, style]) =>
      `@font-face { font-family: "${family}"; src: url("/fonts/${file}") format("woff2"); font-weight: ${weight}; font-style: ${style}; font-display: swap; }`,
  )
  .join("\n")}

:root {
  --scalar-font: "Paritas Sans", ui-sans-serif, system-ui, sans-serif;
  --scalar-font-code: "Paritas Mono", ui-monospace, "SFMono-Regular", Menlo, Consolas, monospace;
  --scalar-radius: 4px;
  --scalar-radius-lg: 8px;
  --scalar-radius-xl: 10px;
  --scalar-semibold: 500;
  --scalar-bold: 600;
}

.light-mode {
  color-scheme: light;
  --scalar-color-1: #161b22;
  --scalar-color-2: #474e58;
  --scalar-color-3: #5f6670;
  --scalar-color-accent: #0d6657;
  --scalar-color-disabled: #8a8f95;
  --scalar-color-ghost: #8a8f95;
  --scalar-background-1: #fbfaf6;
  --scalar-background-2: #f4f2ea;
  --scalar-background-3: #ebe8dc;
  --scalar-background-4: rgba(22, 27, 34, 0.06);
  --scalar-background-accent: #dcebe5;
  --scalar-border-color: #d6d1c2;
  --scalar-scrollbar-color: rgba(22, 27, 34, 0.2);
  --scalar-scrollbar-color-active: rgba(22, 27, 34, 0.38);
  --scalar-button-1: #0d6657;
  --scalar-button-1-hover: #0a5448;
  --scalar-button-1-color: #ffffff;
  --scalar-link-color: #0d6657;
  --scalar-link-color-hover: #0a5448;
  --scalar-color-green: #1f7a3a;
  --scalar-color-red: #b3261e;
  --scalar-color-yellow: #8a6100;
  --scalar-color-blue: #2a48c9;
  --scalar-color-orange: #a5520f;
  --scalar-color-purple: #6b3fa0;
  --scalar-tooltip-background: #161b22;
  --scalar-tooltip-color: #f4f2ea;
}

.dark-mode {
  color-scheme: dark;
  --scalar-color-1: #ebe7dc;
  --scalar-color-2: #aab1b5;
  --scalar-color-3: #8d959a;
  --scalar-color-accent: #5cc6ae;
  --scalar-color-disabled: #6b7378;
  --scalar-color-ghost: #6b7378;
  --scalar-background-1: #11161b;
  --scalar-background-2: #171e25;
  --scalar-background-3: #202931;
  --scalar-background-4: rgba(235, 231, 220, 0.06);
  --scalar-background-accent: #16332d;
  --scalar-border-color: #2c363f;
  --scalar-scrollbar-color: rgba(235, 231, 220, 0.22);
  --scalar-scrollbar-color-active: rgba(235, 231, 220, 0.42);
  --scalar-button-1: #5cc6ae;
  --scalar-button-1-hover: #7bd4c0;
  --scalar-button-1-color: #0b1512;
  --scalar-link-color: #5cc6ae;
  --scalar-link-color-hover: #7bd4c0;
  --scalar-color-green: #6fcf8e;
  --scalar-color-red: #f08a80;
  --scalar-color-yellow: #e0b04a;
  --scalar-color-blue: #8fa6ff;
  --scalar-color-orange: #f0a062;
  --scalar-color-purple: #c6a3f0;
  --scalar-tooltip-background: #ebe7dc;
  --scalar-tooltip-color: #11161b;
}

.light-mode, .dark-mode {
  --scalar-sidebar-background-1: var(--scalar-background-2);
  --scalar-sidebar-color-1: var(--scalar-color-1);
  --scalar-sidebar-color-2: var(--scalar-color-2);
  --scalar-sidebar-border-color: var(--scalar-border-color);
  --scalar-sidebar-item-hover-background: var(--scalar-background-3);
  --scalar-sidebar-item-hover-color: var(--scalar-color-1);
  --scalar-sidebar-item-active-background: var(--scalar-background-accent);
  --scalar-sidebar-color-active: var(--scalar-color-1);
  --scalar-sidebar-indent-border: var(--scalar-border-color);
  --scalar-sidebar-indent-border-hover: var(--scalar-color-3);
  --scalar-sidebar-indent-border-active: var(--scalar-color-accent);
  --scalar-sidebar-search-background: var(--scalar-background-1);
  --scalar-sidebar-search-color: var(--scalar-color-3);
  --scalar-sidebar-search-border-color: var(--scalar-border-color);
}

:focus-visible { outline: 3px solid #2a48c9; outline-offset: 2px; }

/* The renderer's own credit line, version badge and placeholder ASCII art (in the try-it panel before a
   request is sent): the reader should see Paritas only. The renderer is MIT-licensed; its licence text
   stays in node_modules and asks for no visible credit. */
a[href^="https://www.scalar.com"],
a[href^="https://github.com/scalar"],
.scalar-version-number,
.ascii-art { display: none !important; }
.dark-mode :focus-visible { outline-color: #8fa6ff; }
`;

const reference = ApiReference({
  url: "/api/v1/openapi.json",
  cdn: "/vendor/scalar/standalone.js",
  pageTitle: "API reference · Paritas",
  favicon: markDataUri,
  // Our palette and fonts only; "none" also stops the handler from adding its own theme.
  theme: "none",
  customCss,
  withDefaultFonts: false,
  // Nothing leaves the app.
  telemetry: false,
  showDeveloperTools: "never",
  hideClientButton: true,
  agent: { disabled: true },
  // Keys are secrets: never keep them in the browser's storage.
  persistAuth: false,
  documentDownloadType: "json",
  defaultHttpClient: { targetKey: "shell", clientKey: "curl" },
});

/** SHA-256 (base64) of each inline script, as CSP's hash-source has it. */
const inlineHashes = (html: string) =>
  [...html.matchAll(/<script(?![^>]*\bsrc=)[^>]*>([\s\S]*?)<\/script>/g)].map((m) => createHash("sha256").update(m[1]!).digest("base64"));

const built = (async () => {
  const page = reference();
  const html = await page.text();
  return { html, headers: { ...Object.fromEntries(page.headers), "content-security-policy": docsCsp(inlineHashes(html)) } };
})();

export async function GET(): Promise<Response> {
  const { html, headers } = await built;
  return new Response(html, { headers: { ...headers, ...baseSecurityHeaders() } });
}
