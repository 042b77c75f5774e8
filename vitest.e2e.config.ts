import { defineConfig } from "vitest/config";
import { fileURLToPath } from "node:url";

/**
 * The browser tests (tests/e2e): a production build, `next start` and headless Chromium. Run
 * after the other tests, one file at a time, so the build does not compete with them for the CPU.
 */
export default defineConfig({
  resolve: { alias: { "@": fileURLToPath(new URL("./", import.meta.url)) } },
  test: {
    include: ["tests/e2e/**/*.test.ts"],
    setupFiles: ["tests/setup.ts"],
    pool: "forks",
    fileParallelism: false,
    testTimeout: 90_000,
    hookTimeout: 15 * 60_000,
  },
});
