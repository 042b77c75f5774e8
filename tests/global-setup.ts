import { execFileSync } from "node:child_process";

/** The worker pool loads a bundled file: build it from the current sources once before the tests. */
export default function setup(): void {
  execFileSync(process.execPath, ["scripts/build-worker.mjs"], { stdio: "inherit" });
}
