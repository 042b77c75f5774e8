// Builds dist/: the ES module and CommonJS entry points (esbuild), their declarations (tsc), and the
// generated paths types beside them in both module flavours, so `import` and `require` users are both typed.
import { execFileSync } from "node:child_process";
import { copyFileSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";
import { fileURLToPath } from "node:url";
import { build } from "esbuild";

process.chdir(fileURLToPath(new URL("..", import.meta.url)));
rmSync("dist", { recursive: true, force: true });

const source = readFileSync("src/index.ts", "utf8");
await build({ entryPoints: ["src/index.ts"], outfile: "dist/index.js", format: "esm", platform: "node", target: "node18", logLevel: "warning" });
// From stdin, esbuild does not read the source as a Node ES module (this package is "type": "module"); in that mode
// it would bind the default import to openapi-fetch's whole CommonJS exports object instead of its `default` export.
await build({
  stdin: { contents: source, loader: "ts", resolveDir: "src", sourcefile: "index.ts" },
  outfile: "dist/index.cjs",
  format: "cjs",
  platform: "node",
  target: "node18",
  logLevel: "warning",
});

// tsc from this package's devDependencies, or from an enclosing checkout's node_modules when building in place.
const tsc = createRequire(import.meta.url).resolve("typescript/bin/tsc");
execFileSync(process.execPath, [tsc, "-p", "tsconfig.json"], { stdio: "inherit" });

// tsc does not copy a .d.ts source into outDir.
copyFileSync("src/paritas.d.ts", "dist/paritas.d.ts");
copyFileSync("src/paritas.d.ts", "dist/paritas.d.cts");
writeFileSync("dist/index.d.cts", readFileSync("dist/index.d.ts", "utf8").replaceAll('"./paritas.js"', '"./paritas.cjs"'));
