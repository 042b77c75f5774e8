import { spawn, type ChildProcess } from "node:child_process";
import { fileURLToPath } from "node:url";

const ROOT = fileURLToPath(new URL("../../", import.meta.url));

export interface ServerProcess {
  child: ChildProcess;
  base: string;
  /** What the process printed, for failure messages. */
  output(): string;
  /** SIGKILL: no shutdown code runs, as in a crash. Resolves once the process is gone. */
  kill9(): Promise<void>;
}

/**
 * tests/helpers/serve.ts as a process of its own on 127.0.0.1 and a free port, with `env` over this process's
 * environment (so PARITAS_DB_FILE names this test file's database unless `env` says otherwise).
 */
export function startServerProcess(env: Record<string, string> = {}, timeoutMs = 60_000): Promise<ServerProcess> {
  const child = spawn(process.execPath, ["--import", "tsx", "tests/helpers/serve.ts"], {
    cwd: ROOT,
    env: { ...process.env, PORT: "0", ...env },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let out = "";
  const gone = new Promise<void>((ok) => child.once("exit", () => ok()));
  const kill9 = async () => {
    if (child.exitCode === null && child.signalCode === null) child.kill("SIGKILL");
    await gone;
  };
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => {
      void kill9();
      reject(new Error(`server did not start within ${timeoutMs} ms:\n${out}`));
    }, timeoutMs);
    child.stderr!.on("data", (d: Buffer) => (out += d.toString()));
    child.stdout!.on("data", (d: Buffer) => {
      out += d.toString();
      const port = /listening (\d+)/.exec(out)?.[1];
      if (port) {
        clearTimeout(timer);
        resolve({ child, base: `http://127.0.0.1:${port}`, output: () => out, kill9 });
      }
    });
    child.once("exit", (code, signal) => {
      clearTimeout(timer);
      reject(new Error(`server exited (${code ?? signal}) before listening:\n${out}`));
    });
  });
}
