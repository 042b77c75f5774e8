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
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { dirname, join, relative } from "node:path";
import { fileURLToPath } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const nm = (...p) => join(root, "node_modules", ...p);
const pub = (...p) => join(root, "public", ...p);

/**
 * The reference's bundled schema library probes whether eval works (`new Function("")` in a try) to pick a faster
 * parser. /docs' Content-Security-Policy allows no eval, so the probe fails and the library falls back, but the
 * browser reports a policy violation on every visit; the copy answers the probe "no" without trying. A bundle
 * without that exact probe stops the copy, so an upgrade is looked at.
 */
const EVAL_PROBE = 'try{return new Function(""),!0}catch(e){return!1}';
function withoutEvalProbe(text, rel) {
  const at = text.indexOf(EVAL_PROBE);
  if (at < 0 || text.indexOf(EVAL_PROBE, at + 1) >= 0) throw new Error(`vendor-assets: ${rel} has no single eval probe to switch off; check the new version under /docs' policy.`);
  return text.replace(EVAL_PROBE, "return!1");
}

/** [source, destination, transform?] triples that are always copied. */
const vendor = [
  [nm("@scalar", "api-reference", "dist", "browser", "standalone.js"), pub("vendor", "scalar", "standalone.js"), withoutEvalProbe],
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
for (const [src, dest, transform] of jobs) {
  const rel = (p) => relative(root, p);
  if (!existsSync(src)) {
    console.error(`vendor-assets: missing ${rel(src)} — run \`npm install\` first.`);
    failed = true;
    continue;
  }
  let content = readFileSync(src);
  if (transform) {
    try {
      content = Buffer.from(transform(content.toString("utf8"), rel(src)));
    } catch (e) {
      console.error(e.message);
      failed = true;
      continue;
    }
  }
  if (existsSync(dest) && readFileSync(dest).equals(content)) {
    continue; // already up to date
  }
  mkdirSync(dirname(dest), { recursive: true });
  writeFileSync(dest, content);
  console.log(`vendor-assets: ${rel(src)} -> ${rel(dest)}`);
}
process.exit(failed ? 1 : 0);
