import { execFile } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { unzipSync } from "fflate";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { formatLambda } from "../../shared/format/number-format";
import { createApiToken } from "../../server/services/api-tokens";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { pdfText } from "../helpers/pdf";
import { signUpAgent, startTestServer, type TestServer } from "../helpers/server";

/**
 * Every shell and Python example in the README's "The API for scripts"
 * section runs here against a test server with a read-only token, and its
 * output is checked. An example without a check (or a check without its
 * example) fails, so the README cannot rot.
 */
const run = promisify(execFile);
const README = readFileSync(path.resolve(__dirname, "../../README.md"), "utf8");

interface Example {
  name: string;
  language: "sh" | "python";
  code: string;
}

function examples(): { found: Example[]; unmarked: string[] } {
  const start = README.indexOf("## The API for scripts");
  const end = README.indexOf("\n## ", start + 1);
  const section = README.slice(start, end === -1 ? undefined : end);
  const found: Example[] = [];
  const unmarked: string[] = [];
  const block = /(?:<!-- example: ([a-z0-9-]+) -->\n)?```(sh|python)\n([\s\S]*?)```/g;
  for (const m of section.matchAll(block)) {
    if (m[1]) found.push({ name: m[1], language: m[2] as Example["language"], code: m[3]! });
    else unmarked.push(m[3]!.split("\n")[0]!);
  }
  return { found, unmarked };
}

let server: TestServer;
let token: string;
let lambda: number;
let workDir: string;

beforeAll(async () => {
  server = await startTestServer();
  const owner = await signUpAgent(server);
  const studyId = (await owner.post("/api/v1/studies", { name: "Hillside" })).body.id;
  const lc = await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: threeStageLifeCycle() });
  lambda = (await owner.get(`/api/v1/life-cycles/${lc.body.id}/analysis`)).body.lambda;
  // Read-only: every example must work with the narrowest token.
  token = (await createApiToken(server.db, owner.user.id, "readme", { scope: "read", expiresInDays: 1 })).token;
  workDir = mkdtempSync(path.join(tmpdir(), "sw-readme-"));
});
afterAll(async () => {
  if (workDir) rmSync(workDir, { recursive: true, force: true });
  await server?.close();
});

async function execute(example: Example): Promise<string> {
  const env = { ...process.env, STAGEWRIGHT_URL: server.url, STAGEWRIGHT_TOKEN: token };
  const [cmd, args] = example.language === "sh" ? ["bash", ["-e", "-o", "pipefail", "-c", example.code]] : ["python3", ["-c", example.code]];
  const { stdout } = await run(cmd, args, { env, cwd: workDir, timeout: 60_000 });
  return stdout;
}

/** λ of the README's Leslie matrix, from its characteristic equation λ³ = 0.9 λ + 0.3996 (0.6·1.5 and 0.6·0.333·2), by Newton's method. */
function leslieLambda(): number {
  let x = 1;
  for (let i = 0; i < 50; i++) x -= (x ** 3 - 0.9 * x - 0.3996) / (3 * x ** 2 - 0.9);
  return x;
}

const CHECKS: Record<string, (stdout: string) => Promise<void> | void> = {
  "analyze-matrix": (stdout) => {
    const body = JSON.parse(stdout);
    expect(body.lambda).toBeCloseTo(leslieLambda(), 10);
    expect(body.stableStage).toHaveLength(3);
  },
  "report-pdf": async (stdout) => {
    expect(stdout.trim().split(/\s+/).sort()).toEqual(["report.pdf", "study.zip"]);
    const pdf = readFileSync(path.join(workDir, "report.pdf"));
    expect((await pdfText(pdf)).text).toContain(`λ = ${formatLambda(lambda)}`);
    const zip = unzipSync(new Uint8Array(readFileSync(path.join(workDir, "study.zip"))));
    expect(Object.keys(zip)).toContain("README.txt");
  },
  "lambda-table": (stdout) => {
    expect(stdout).toBe(`Hillside\tThree-stage test\t${formatLambda(lambda)}\n`);
  },
  "analyze-python": (stdout) => {
    const lines = stdout.trim().split("\n");
    expect(lines[0]).toBe(`lambda ${Number(leslieLambda().toFixed(4))}`);
    const elasticities = lines.slice(1, 4).flatMap((l) => l.split(" ").map(Number));
    expect(elasticities).toHaveLength(9);
    expect(elasticities.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 2);
    expect(lines[4]).toMatch(/^refused 400: matrix\.0\.1: .*negative/);
  },
};

describe("README examples for scripts", () => {
  const { found, unmarked } = examples();

  it("every example has a check and every check an example", () => {
    expect(unmarked).toEqual([]);
    expect(found.map((e) => e.name).sort()).toEqual(Object.keys(CHECKS).sort());
  });

  for (const example of found) {
    it(`${example.name} (${example.language}) runs and prints what the README promises`, async () => {
      const check = CHECKS[example.name];
      expect(check, `no check for ${example.name}`).toBeDefined();
      await check!(await execute(example));
      if (example.name === "report-pdf") expect(existsSync(path.join(workDir, "report.pdf"))).toBe(true);
    });
  }
});
