import { spawn, type ChildProcess } from "node:child_process";

/** A real worker process (the one `npm run worker` starts) against a test database. */
export function startWorker(databaseUrl: string): { child: ChildProcess; stop: () => Promise<void>; kill9: () => Promise<void> } {
  const child = spawn(process.execPath, ["--import", "tsx", "server/worker.ts"], {
    env: { ...process.env, DATABASE_URL: databaseUrl, NODE_ENV: "test" },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let output = "";
  child.stdout!.on("data", (d) => (output += d));
  child.stderr!.on("data", (d) => (output += d));
  const exited = new Promise<void>((resolve) => child.once("exit", () => resolve()));
  const end = async (signal: NodeJS.Signals) => {
    if (child.exitCode === null && child.signalCode === null) child.kill(signal);
    await exited;
  };
  return {
    child,
    stop: () => end("SIGTERM"),
    kill9: () => end("SIGKILL"),
    get output() {
      return output;
    },
  } as { child: ChildProcess; stop: () => Promise<void>; kill9: () => Promise<void> };
}
