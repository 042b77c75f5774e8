// Builds dist/paritas-claims.mjs: the command and everything it imports (commander, yaml, zod, xmlbuilder2, the typed
// client from ../client/src and its openapi-fetch) in one ES module, so the installed package needs no dependencies.
import { chmodSync, rmSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { build } from "esbuild";

process.chdir(fileURLToPath(new URL("..", import.meta.url)));
rmSync("dist", { recursive: true, force: true });
const outfile = "dist/paritas-claims.mjs";
await build({
  absWorkingDir: process.cwd(),
  entryPoints: ["src/main.ts"],
  outfile,
  bundle: true,
  format: "esm",
  platform: "node",
  target: "node18",
  // CommonJS dependencies (xmlbuilder2) call require() for Node built-ins, which an ES module lacks.
  banner: { js: 'import { createRequire as __paritasRequire } from "node:module"; const require = __paritasRequire(import.meta.url);' },
  minify: true,
  legalComments: "eof",
  logLevel: "warning",
});
chmodSync(outfile, 0o755);
