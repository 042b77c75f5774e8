/**
 * Runs in the browser before the app's own modules. zod probes once whether eval works (a `new Function` in a try)
 * to pick a faster object parser; the pages' Content-Security-Policy allows no eval (proxy.ts), so the probe is
 * refused and reported as a violation although zod falls back. `jitless` skips the probe. zod keeps its
 * configuration on this global, so it is set here without loading zod (and before any schema is built).
 */
const g = globalThis as { __zod_globalConfig?: { jitless?: boolean } };
(g.__zod_globalConfig ??= {}).jitless = true;

export {};
