// Bundles the worker pool's entry (lib/jobs/pool-worker.ts and the math it imports) into one plain
// JavaScript file on disk, dist/pool-worker.mjs: worker threads cannot load TypeScript, and Next's bundler
// does not ship a worker entry. Run by postinstall, before `next build` / `next dev`, and by the tests.
import { build } from "esbuild";
import { fileURLToPath } from "node:url";

const root = fileURLToPath(new URL("..", import.meta.url));
await build({
  absWorkingDir: root,
  entryPoints: ["lib/jobs/pool-worker.ts"],
  outfile: "dist/pool-worker.mjs",
  bundle: true,
  platform: "node",
  target: "node20",
  format: "esm",
  tsconfig: "tsconfig.json",
  // Some bundled CommonJS (zod's locales, @stdlib) calls require(); give the ES module one.
  banner: { js: "import { createRequire as __paritasRequire } from 'node:module'; const require = __paritasRequire(import.meta.url);" },
  logLevel: "warning",
});
