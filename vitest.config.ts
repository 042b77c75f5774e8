import { defineConfig } from "vitest/config";
import { fileURLToPath } from "node:url";

/** Unit, API, console and CLI tests. The browser tests have their own config (vitest.e2e.config.ts). */
export default defineConfig({
  // The typed client as the app imports it (tsconfig paths): its source in packages/client.
  resolve: { alias: { "@paritas/client": fileURLToPath(new URL("./packages/client/src/index.ts", import.meta.url)), "@": fileURLToPath(new URL("./", import.meta.url)) } },
  test: {
    include: ["tests/**/*.test.ts"],
    exclude: ["tests/e2e/**", "**/node_modules/**"],
    setupFiles: ["tests/setup.ts"],
    globalSetup: ["tests/global-setup.ts"],
    pool: "forks",
    testTimeout: 20000,
  },
});
