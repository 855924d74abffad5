// The web server as several processes sharing one port (WEB_PROCESSES, the
// production default of one per core): requests are answered by all of them,
// a process that dies is replaced, rate limits count across processes, and
// stopping the primary (SIGTERM, or even kill -9) leaves no process behind.
import fs from "node:fs";
import http from "node:http";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestDatabase } from "../helpers/db";
import { startWebProcess, type WebProcess } from "../helpers/web-process";

/** The live web server processes started by `pid` (Linux /proc; tsx's esbuild helper is not one). */
function childrenOf(pid: number): number[] {
  return fs
    .readdirSync("/proc")
    .filter((d) => /^\d+$/.test(d))
    .filter((d) => {
      try {
        const stat = fs.readFileSync(`/proc/${d}/stat`, "utf8");
        const [state, ppid] = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
        return Number(ppid) === pid && state !== "Z" && fs.readFileSync(`/proc/${d}/cmdline`, "utf8").includes("server/index.ts");
      } catch {
        return false;
      }
    })
    .map(Number);
}

const alive = (pid: number) => {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
};

async function until(what: string, check: () => boolean, ms = 30_000) {
  const end = Date.now() + ms;
  while (!check()) {
    if (Date.now() > end) throw new Error(`Timed out waiting until ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

/** A request on a connection of its own (no keep-alive), so the primary hands each to the next process. */
function freshRequest(url: string, method = "GET", body?: unknown, headers: Record<string, string> = {}): Promise<{ status: number; body: string; setCookie: string[] }> {
  return new Promise((resolve, reject) => {
    const data = body === undefined ? undefined : JSON.stringify(body);
    const req = http.request(url, { method, agent: false, headers: { connection: "close", ...headers, ...(data ? { "content-type": "application/json", "content-length": Buffer.byteLength(data) } : {}) } }, (res) => {
      let text = "";
      res.on("data", (d) => (text += d));
      res.on("end", () => resolve({ status: res.statusCode!, body: text, setCookie: res.headers["set-cookie"] ?? [] }));
    });
    req.on("error", reject);
    req.end(data);
  });
}

const PROCESS_TEST_MS = 180_000;

describe("two web server processes", () => {
  let database: Awaited<ReturnType<typeof createTestDatabase>>;
  let web: WebProcess;
  beforeAll(async () => {
    database = await createTestDatabase();
    web = await startWebProcess(database.url, { WEB_PROCESSES: "2" });
  }, PROCESS_TEST_MS);
  afterAll(async () => {
    await web?.stop();
    await database?.drop();
  });

  it("announces both and answers on the shared port", async () => {
    expect(web.output()).toMatch(/Stagewright web server on http:\/\/127\.0\.0\.1:\d+ \(2 processes\)/);
    expect(childrenOf(web.child.pid!)).toHaveLength(2);
    for (let i = 0; i < 6; i++) expect((await freshRequest(`${web.url}/api/v1/health`)).status).toBe(200);
  });

  it("replaces a process killed with SIGKILL, and keeps answering meanwhile", async () => {
    const [victim, survivor] = childrenOf(web.child.pid!);
    process.kill(victim!, "SIGKILL");
    await until("the killed process is gone", () => !alive(victim!));
    for (let i = 0; i < 4; i++) expect((await freshRequest(`${web.url}/api/v1/health`)).status).toBe(200);
    await until("a replacement is running", () => childrenOf(web.child.pid!).filter((p) => p !== victim).length === 2);
    expect(childrenOf(web.child.pid!)).toContain(survivor);
    expect(web.output()).toMatch(new RegExp(`pid ${victim}\\) ended \\(SIGKILL\\); starting another`));
  }, PROCESS_TEST_MS);

  it("counts the sign-in limit across processes", async () => {
    // The limit is 20 attempts per address and e-mail in 15 minutes (server/config.ts). Each attempt
    // goes on a new connection, so the attempts are shared between the two processes: with a count
    // per process neither would reach 20 and no attempt would be refused.
    const first = await freshRequest(`${web.url}/api/v1/auth/session`);
    const csrf = first.setCookie.find((c) => c.startsWith("sw_csrf="))!.split(";")[0]!;
    const headers = { cookie: csrf, "x-csrf-token": decodeURIComponent(csrf.slice("sw_csrf=".length)) };
    const statuses: number[] = [];
    for (let i = 0; i < 26; i++) statuses.push((await freshRequest(`${web.url}/api/v1/auth/sign-in`, "POST", { email: "shared-limit@example.org", password: "guess" }, headers)).status);
    expect(statuses).toEqual([...new Array<number>(20).fill(401), 429, 429, 429, 429, 429, 429]);
  }, PROCESS_TEST_MS);

  it("SIGTERM to the primary stops every process", async () => {
    const processes = childrenOf(web.child.pid!);
    expect(processes).toHaveLength(2);
    expect(await web.stop()).toBe("0");
    await until("every web server process has exited", () => processes.every((p) => !alive(p)), 15_000);
  }, PROCESS_TEST_MS);
});

it("kill -9 of the primary: its processes stop rather than serve on alone", async () => {
  const database = await createTestDatabase();
  try {
    const web = await startWebProcess(database.url, { WEB_PROCESSES: "2" });
    const processes = childrenOf(web.child.pid!);
    expect(processes).toHaveLength(2);
    web.child.kill("SIGKILL");
    await web.exited;
    await until("the orphaned processes have exited", () => processes.every((p) => !alive(p)), 15_000);
  } finally {
    await database.drop();
  }
}, PROCESS_TEST_MS);
