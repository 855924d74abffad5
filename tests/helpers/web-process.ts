import { spawn, type ChildProcess } from "node:child_process";
import net from "node:net";

/** A free loopback port (asked of the kernel, then released). */
export async function freePort(): Promise<number> {
  const srv = net.createServer();
  await new Promise<void>((resolve) => srv.listen(0, "127.0.0.1", resolve));
  const port = (srv.address() as net.AddressInfo).port;
  await new Promise<void>((resolve) => srv.close(() => resolve()));
  return port;
}

export interface WebProcess {
  url: string;
  child: ChildProcess;
  /** Everything it printed so far. */
  output(): string;
  /** Resolves with the signal or exit code when the process ends. */
  exited: Promise<string>;
  stop(): Promise<string>;
}

/** The real web server (`node --import tsx server/index.ts`, as production runs it) against `databaseUrl`, in a process of its own. */
export async function startWebProcess(databaseUrl: string, env: Record<string, string> = {}): Promise<WebProcess> {
  const port = await freePort();
  const child = spawn(process.execPath, ["--import", "tsx", "server/index.ts"], {
    env: { ...process.env, NODE_ENV: "test", DATABASE_URL: databaseUrl, PORT: String(port), HOST: "127.0.0.1", SMTP_PORT: String(await freePort()), STATIC_DIR: "/nonexistent", ...env },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let output = "";
  child.stdout!.on("data", (d) => (output += d));
  child.stderr!.on("data", (d) => (output += d));
  const exited = new Promise<string>((resolve) => child.once("exit", (code, signal) => resolve(signal ?? String(code))));
  const until = Date.now() + 60_000;
  while (!output.includes("Stagewright web server on")) {
    if (child.exitCode !== null || child.signalCode !== null) throw new Error(`The web server exited before listening:\n${output}`);
    if (Date.now() > until) throw new Error(`The web server did not start within 60 s:\n${output}`);
    await new Promise((r) => setTimeout(r, 50));
  }
  return {
    url: `http://127.0.0.1:${port}`,
    child,
    output: () => output,
    exited,
    async stop() {
      if (child.exitCode === null && child.signalCode === null) child.kill("SIGTERM");
      return exited;
    },
  };
}
