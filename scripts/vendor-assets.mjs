#!/usr/bin/env node
/**
 * Copies browser assets that the app serves itself (nothing is loaded from a CDN at run time).
 *
 *   node scripts/vendor-assets.mjs          copy the API-reference script into public/vendor/ (git-ignored)
 *   node scripts/vendor-assets.mjs --fonts  also refresh the committed woff2 files in public/fonts/
 *
 * Runs from package.json as "postinstall", "predev" and "prebuild". Exits non-zero with a clear
 * message if a source file is missing, so a build never ships a page whose script 404s.
 */
import { copyFileSync, existsSync, mkdirSync, readFileSync, statSync } from "node:fs";
import { dirname, join, relative } from "node:path";
import { fileURLToPath } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const nm = (...p) => join(root, "node_modules", ...p);
const pub = (...p) => join(root, "public", ...p);

/** [source, destination] pairs that are always copied. */
const vendor = [
  [nm("@scalar", "api-reference", "dist", "browser", "standalone.js"), pub("vendor", "scalar", "standalone.js")],
];

/** Latin subset only: the weights app/layout.tsx and app/docs/route.ts refer to. */
const fontFiles = [
  ["ibm-plex-sans", "ibm-plex-sans-latin-400-normal.woff2"],
  ["ibm-plex-sans", "ibm-plex-sans-latin-400-italic.woff2"],
  ["ibm-plex-sans", "ibm-plex-sans-latin-500-normal.woff2"],
  ["ibm-plex-sans", "ibm-plex-sans-latin-600-normal.woff2"],
  ["ibm-plex-mono", "ibm-plex-mono-latin-400-normal.woff2"],
  ["ibm-plex-mono", "ibm-plex-mono-latin-500-normal.woff2"],
];
const fonts = [
  ...fontFiles.map(([pkg, file]) => [nm("@fontsource", pkg, "files", file), pub("fonts", file)]),
  // SIL Open Font License 1.1 travels with the font files.
  [nm("@fontsource", "ibm-plex-sans", "LICENSE"), pub("fonts", "LICENSE-ibm-plex-sans.txt")],
  [nm("@fontsource", "ibm-plex-mono", "LICENSE"), pub("fonts", "LICENSE-ibm-plex-mono.txt")],
];

const jobs = process.argv.includes("--fonts") ? [...vendor, ...fonts] : vendor;

let failed = false;
for (const [src, dest] of jobs) {
  const rel = (p) => relative(root, p);
  if (!existsSync(src)) {
    console.error(`vendor-assets: missing ${rel(src)} — run \`npm install\` first.`);
    failed = true;
    continue;
  }
  if (existsSync(dest) && statSync(dest).size === statSync(src).size && readFileSync(dest).equals(readFileSync(src))) {
    continue; // already up to date
  }
  mkdirSync(dirname(dest), { recursive: true });
  copyFileSync(src, dest);
  console.log(`vendor-assets: ${rel(src)} -> ${rel(dest)}`);
}
process.exit(failed ? 1 : 0);
