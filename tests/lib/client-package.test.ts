import { execFile } from "node:child_process";
import { cpSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { createServer, type IncomingMessage } from "node:http";
import type { AddressInfo } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { clientSnippet } from "@/lib/console-client/snippets";

/**
 * @paritas/client as a stranger gets it: the package folder copied out of the checkout (so nothing resolves from the
 * repository's node_modules), its devDependencies installed, `npm pack`ed, and the tarball installed into a scratch
 * project that imports it with plain Node and type-checks against it.
 */

const run = promisify(execFile);
const repo = process.cwd();
const rootTsc = join(repo, "node_modules/typescript/bin/tsc");

// npm run from inside `npm`/`npx` inherits npm_config_* (local prefix among them): drop them so each npm call works on its own folder.
const env = { ...process.env };
for (const k of Object.keys(env)) if (/^npm_/i.test(k)) delete env[k];
const npm = (args: string[], cwd: string) => run("npm", [...args, "--prefer-offline", "--no-audit", "--no-fund"], { cwd, env });

interface Seen {
  method?: string;
  url?: string;
  authorization?: string;
  contentType?: string;
  body: unknown;
}
const seen: Seen[] = [];
const server = createServer((req: IncomingMessage, res) => {
  let raw = "";
  req.on("data", (c: Buffer) => (raw += c.toString("utf8")));
  req.on("end", () => {
    const body: unknown = raw ? JSON.parse(raw) : null;
    seen.push({ method: req.method, url: req.url, authorization: req.headers.authorization, contentType: req.headers["content-type"], body });
    // A stub, not the API: the client's transport is under test here, the math is tested against the real server elsewhere.
    if (req.url === "/api/v1/encode" && JSON.stringify(body).includes("refuse")) {
      res.writeHead(422, { "content-type": "application/problem+json" });
      res.end(JSON.stringify({ type: "about:blank", title: "Invalid request", status: 422, detail: "stub refusal", instance: "req-1" }));
      return;
    }
    res.writeHead(200, { "content-type": "application/json", "x-request-id": "req-2" });
    res.end(JSON.stringify({ echoed: body }));
  });
});

let tmp = "";
let scratch = "";
let baseUrl = "";
let packed: string[] = [];

beforeAll(async () => {
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", () => r()));
  baseUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}/api/v1`;

  tmp = mkdtempSync(join(tmpdir(), "paritas-client-"));
  const pkg = join(tmp, "client");
  cpSync(join(repo, "packages/client"), pkg, { recursive: true, filter: (src) => !/[\\/](node_modules|dist)$/.test(src) });
  // Scripts off here: `npm pack` runs the `prepare` build itself, and esbuild's binary comes from its platform package.
  await npm(["ci", "--ignore-scripts"], pkg);
  await npm(["pack", "--pack-destination", tmp], pkg);
  const tgz = readdirSync(tmp).find((f) => f.endsWith(".tgz"));
  if (!tgz) throw new Error(`npm pack left no tarball in ${tmp}`);
  packed = (await run("tar", ["-tzf", join(tmp, tgz)])).stdout.trim().split("\n").sort();

  scratch = join(tmp, "scratch");
  mkdirSync(scratch);
  writeFileSync(join(scratch, "package.json"), JSON.stringify({ name: "scratch", private: true, type: "module" }));
  await npm(["install", join(tmp, tgz)], scratch);
}, 180_000);

afterAll(async () => {
  await new Promise<void>((r) => server.close(() => r()));
  if (tmp) rmSync(tmp, { recursive: true, force: true });
});

describe("@paritas/client package", () => {
  it("packs the built entry points, their declarations and the generated types, and no sources", () => {
    expect(packed).toEqual(
      [
        "README.md",
        "dist/index.cjs",
        "dist/index.d.cts",
        "dist/index.d.ts",
        "dist/index.js",
        "dist/paritas.d.cts",
        "dist/paritas.d.ts",
        "package.json",
      ].map((f) => `package/${f}`),
    );
    const installed = join(scratch, "node_modules/@paritas/client");
    expect(readFileSync(join(installed, "dist/paritas.d.ts"), "utf8")).toBe(readFileSync(join(repo, "packages/client/src/paritas.d.ts"), "utf8"));
    expect(JSON.parse(readFileSync(join(installed, "package.json"), "utf8")).version).toBe("0.1.0");
  });

  for (const [flavour, file, load] of [
    ["import", "call.mjs", `import { createParitasClient } from "@paritas/client";`],
    ["require", "call.cjs", `const { createParitasClient } = require("@paritas/client");`],
  ] as const) {
    it(`calls an endpoint with the key from plain Node (${flavour})`, async () => {
      writeFileSync(
        join(scratch, file),
        [
          load,
          `(async () => {`,
          `  const paritas = createParitasClient({ baseUrl: process.env.BASE_URL, key: "test.scratch-key" });`,
          `  const ok = await paritas.POST("/encode", { body: { code: { family: "hamming", r: 3 }, messages: ["1011"] } });`,
          `  const bad = await paritas.POST("/encode", { body: { code: { family: "hamming", r: 3 }, messages: ["refuse"] } });`,
          `  console.log(JSON.stringify({ ok: [ok.response.status, ok.data, ok.error], bad: [bad.response.status, bad.data, bad.error] }));`,
          `})();`,
        ].join("\n"),
      );
      seen.length = 0;
      const { stdout } = await run(process.execPath, [file], { cwd: scratch, env: { ...env, BASE_URL: baseUrl } });
      const out = JSON.parse(stdout) as { ok: unknown[]; bad: unknown[] };
      const sent = { code: { family: "hamming", r: 3 }, messages: ["1011"] };
      // [status, data, error]; JSON writes a missing side as null.
      expect(out.ok).toEqual([200, { echoed: sent }, null]);
      expect(out.bad).toEqual([422, null, expect.objectContaining({ status: 422, detail: "stub refusal" })]);
      expect(seen).toHaveLength(2);
      expect(seen[0]).toEqual({ method: "POST", url: "/api/v1/encode", authorization: "Bearer test.scratch-key", contentType: "application/json", body: sent });
    }, 60_000);
  }

  it("type-checks the bench's snippets (POST and GET) and the README example, and rejects a wrong path or body against the installed types (import and require)", async () => {
    const snippet = clientSnippet({ method: "POST", path: "/encode", input: { code: { family: "hamming", r: 3 }, messages: ["1011"] }, origin: "https://paritas.example" });
    expect(snippet).toContain(`from "@paritas/client"`);
    const declareProcess = "declare const process: { env: Record<string, string | undefined> };";
    writeFileSync(
      join(scratch, "snippet.ts"),
      [
        declareProcess,
        snippet,
        // If the paths were untyped (`any`), these would compile and the unused @ts-expect-error would fail the check.
        `// @ts-expect-error no such path`,
        `await paritas.POST("/no-such-path", { body: {} });`,
        `// @ts-expect-error messages must be words, not a number`,
        `await paritas.POST("/encode", { body: { code: { family: "hamming", r: 3 }, messages: 1011 } });`,
        `const count: number | undefined = data?.codewords.length;`,
        `void count;`,
      ].join("\n"),
    );
    const getSnippet = clientSnippet({ method: "GET", path: "/usage", input: { from: "2026-11-01", limit: 50 }, origin: "https://paritas.example" });
    writeFileSync(join(scratch, "snippet-get.ts"), `${declareProcess}\n${getSnippet}`);
    // The package README's example, as a reader would paste it.
    const example = /```ts\n([\s\S]*?)```/.exec(readFileSync(join(repo, "packages/client/README.md"), "utf8"))?.[1];
    expect(example).toContain("createParitasClient");
    writeFileSync(join(scratch, "readme.ts"), `${declareProcess}\n${example}`);
    writeFileSync(
      join(scratch, "required.cts"),
      [
        `import { createParitasClient, type paths } from "@paritas/client";`,
        `const paritas = createParitasClient({ baseUrl: "https://paritas.example/api/v1", key: "k" });`,
        `type Encode = paths["/encode"]["post"];`,
        `export const call = (): Promise<unknown> => paritas.POST("/encode", { body: { code: { family: "hamming", r: 3 }, messages: ["1011"] } });`,
        `// @ts-expect-error no such path`,
        `export const wrong = () => paritas.GET("/no-such-path");`,
        `export type { Encode };`,
      ].join("\n"),
    );
    writeFileSync(
      join(scratch, "tsconfig.json"),
      JSON.stringify({
        compilerOptions: { target: "es2022", lib: ["es2022", "dom"], types: [], module: "nodenext", moduleResolution: "nodenext", strict: true, noEmit: true },
        files: ["snippet.ts", "snippet-get.ts", "readme.ts", "required.cts"],
      }),
    );
    const result = await run(process.execPath, [rootTsc, "-p", "tsconfig.json"], { cwd: scratch }).catch((e: { stdout: string }) => e);
    expect(result.stdout).toBe("");
  }, 60_000);
});
