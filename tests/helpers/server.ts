import type { AddressInfo } from "node:net";
import type { Server } from "node:http";
import path from "node:path";
import { and, desc, eq, like } from "drizzle-orm";
import supertest from "supertest";
import { createApp } from "../../server/app";
import { loadConfig, type Config } from "../../server/config";
import { mailOutbox } from "../../server/db/schema";
import { startFakeSmtp } from "../../server/mail/fake-smtp";
import { createMailer } from "../../server/mail/mailer";
import { createJobSender } from "../../server/runs/queue";
import { RUN_KINDS } from "../../server/runs/registry";
import { createTestDatabase } from "./db";

export interface TestServer {
  url: string;
  /** The test database's connection string (a worker process can be pointed at it). */
  databaseUrl: string;
  app: ReturnType<typeof createApp>;
  db: Awaited<ReturnType<typeof createTestDatabase>>["db"];
  pool: Awaited<ReturnType<typeof createTestDatabase>>["pool"];
  config: Config;
  /** The newest caught message to `to` (whose subject matches `subject`, if given), waiting up to `timeoutMs` for it. */
  mailTo(to: string, timeoutMs?: number, subject?: RegExp): Promise<{ subject: string; text: string; links: string[] }>;
  close(): Promise<void>;
}

/** A real server on a loopback port, with its own database and SMTP fake. */
export async function startTestServer(overrides: Partial<Config> = {}): Promise<TestServer> {
  const database = await createTestDatabase();
  const smtp = await startFakeSmtp(database.db, 0);
  const base = loadConfig({ NODE_ENV: "test", DATABASE_URL: database.url, SMTP_PORT: String(smtp.port) });
  const httpServer: { server?: Server } = {};
  const config: Config = { ...base, staticDir: path.resolve(process.env.STAGEWRIGHT_DIST ?? "dist"), ...overrides };
  const mailer = createMailer(config.smtp);
  // publicUrl depends on the port, known only after listen: links are built from config at request time.
  const jobs = createJobSender(database.url);
  const app = createApp({ ...database, config, mailer, kinds: RUN_KINDS, jobs });
  await new Promise<void>((resolve) => {
    httpServer.server = app.listen(0, "127.0.0.1", () => resolve());
  });
  const port = (httpServer.server!.address() as AddressInfo).port;
  const url = `http://127.0.0.1:${port}`;
  config.publicUrl = url;
  return {
    url,
    databaseUrl: database.url,
    app,
    db: database.db,
    pool: database.pool,
    config,
    async mailTo(to, timeoutMs = 5000, subject) {
      const until = Date.now() + timeoutMs;
      for (;;) {
        const rows = await database.db.select().from(mailOutbox).orderBy(desc(mailOutbox.id));
        const m = rows.find((r) => r.to.split(", ").includes(to) && (!subject || subject.test(r.subject)));
        if (m) return { subject: m.subject, text: m.text, links: m.text.match(/https?:\/\/\S+/g) ?? [] };
        if (Date.now() > until) throw new Error(`No e-mail to ${to} arrived within ${timeoutMs} ms`);
        await new Promise((r) => setTimeout(r, 50));
      }
    },
    async close() {
      httpServer.server?.closeAllConnections();
      await new Promise<void>((resolve) => httpServer.server!.close(() => resolve()));
      mailer.close();
      await jobs.stop();
      await smtp.close();
      await database.drop();
    },
  };
}

/**
 * A cookie-keeping client that behaves like the web client: it fetches the
 * session (which sets the CSRF cookie) and echoes the token on every write.
 */
export async function browserAgent(server: TestServer) {
  const agent = supertest.agent(server.app);
  const res = await agent.get("/api/v1/auth/session");
  const cookie = (res.headers["set-cookie"] as unknown as string[] | undefined)?.find((c) => c.startsWith("sw_csrf="));
  const csrf = cookie ? decodeURIComponent(cookie.split(";")[0]!.slice("sw_csrf=".length)) : "";
  const withCsrf = <T extends { set(name: string, value: string): T }>(t: T) => t.set("X-CSRF-Token", csrf);
  return {
    agent,
    csrf,
    get: (p: string) => agent.get(p),
    post: (p: string, body?: object) => withCsrf(agent.post(p)).send(body),
    put: (p: string, body?: object) => withCsrf(agent.put(p)).send(body),
    patch: (p: string, body?: object) => withCsrf(agent.patch(p)).send(body),
    delete: (p: string) => withCsrf(agent.delete(p)),
  };
}
export type BrowserAgent = Awaited<ReturnType<typeof browserAgent>>;

let counter = 0;
/** Signs up a fresh user through the API and returns a signed-in agent. */
export async function signUpAgent(server: TestServer, overrides: Partial<{ name: string; email: string; password: string }> = {}) {
  const a = await browserAgent(server);
  const n = ++counter;
  const user = { name: `Tester ${n}`, email: `tester${n}.${Date.now()}@example.org`, password: "correct horse battery", ...overrides };
  const res = await a.post("/api/v1/auth/sign-up", user);
  if (res.status !== 202) throw new Error(`sign-up failed: ${res.status} ${JSON.stringify(res.body)}`);
  // The account exists once the e-mailed link is opened.
  const done = await a.post("/api/v1/auth/sign-up/confirm", { token: await signUpToken(server, user.email.toLowerCase()) });
  if (done.status !== 201) throw new Error(`sign-up confirmation failed: ${done.status} ${JSON.stringify(done.body)}`);
  return { ...a, user: { ...user, id: done.body.user.id as string } };
}

/**
 * The token of the newest sign-up link e-mailed to `email`. The message is
 * taken out of the outbox, so a later `mailTo` of this person finds only mail
 * that the test's own actions caused (some are sent after their answer).
 */
export async function signUpToken(server: TestServer, email: string): Promise<string> {
  const link = (await server.mailTo(email, 5000, /Finish creating/)).links.find((l) => l.includes("/sign-up/confirm?token="));
  if (!link) throw new Error(`The newest e-mail to ${email} has no sign-up link.`);
  await server.db.delete(mailOutbox).where(and(eq(mailOutbox.to, email), like(mailOutbox.subject, "Finish creating%")));
  return new URL(link).searchParams.get("token")!;
}
