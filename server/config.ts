import os from "node:os";
import { z } from "zod";

const EnvSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATABASE_URL: z.string().min(1, "DATABASE_URL must point at the Stagewright PostgreSQL database"),
  PORT: z.coerce.number().int().min(0).max(65535).default(3000),
  HOST: z.string().default("127.0.0.1"),
  /** The address people reach the web app at; used in e-mailed links. */
  PUBLIC_URL: z.string().url().optional(),
  SESSION_SECRET: z.string().min(16).default("stagewright-development-secret-change-me"),
  SMTP_HOST: z.string().default("127.0.0.1"),
  SMTP_PORT: z.coerce.number().int().default(2525),
  SMTP_USER: z.string().optional(),
  SMTP_PASSWORD: z.string().optional(),
  SMTP_SECURE: z.enum(["true", "false"]).default("false"),
  MAIL_FROM: z.string().default("Stagewright <no-reply@stagewright.localhost>"),
  /** Serve the Mail outbox page and API (never in production). */
  MAIL_OUTBOX: z.enum(["on", "off"]).optional(),
  STATIC_DIR: z.string().optional(),
  /** Largest Study export (zip contents before compression), in megabytes. */
  EXPORT_LIMIT_MB: z.coerce.number().positive().default(200),
  /** Web server processes sharing the port (node:cluster); default one per core in production, else one. */
  WEB_PROCESSES: z.coerce.number().int().min(1).max(64).optional(),
});

export type Config = {
  env: "development" | "production" | "test";
  databaseUrl: string;
  port: number;
  host: string;
  publicUrl: string;
  sessionSecret: string;
  smtp: { host: string; port: number; secure: boolean; user?: string; password?: string; from: string };
  mailOutbox: boolean;
  staticDir?: string;
  /** Sign-in and reset attempts allowed per window (per client address and e-mail). */
  authRateLimit: { windowMs: number; max: number };
  /** Largest Study export, in bytes of the files before compression. */
  exportLimitBytes: number;
  /** API tokens one account may mint per window. */
  tokenRateLimit: { windowMs: number; max: number };
  /** How many web server processes share the port (see server/index.ts). */
  webProcesses: number;
};

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const e = EnvSchema.parse(env);
  if (e.NODE_ENV === "production" && e.SESSION_SECRET === "stagewright-development-secret-change-me") {
    throw new Error("Set SESSION_SECRET in production.");
  }
  return {
    env: e.NODE_ENV,
    databaseUrl: e.DATABASE_URL,
    port: e.PORT,
    host: e.HOST,
    publicUrl: (e.PUBLIC_URL ?? `http://${e.HOST}:${e.PORT}`).replace(/\/$/, ""),
    sessionSecret: e.SESSION_SECRET,
    smtp: {
      host: e.SMTP_HOST,
      port: e.SMTP_PORT,
      secure: e.SMTP_SECURE === "true",
      user: e.SMTP_USER,
      password: e.SMTP_PASSWORD,
      from: e.MAIL_FROM,
    },
    mailOutbox: e.MAIL_OUTBOX ? e.MAIL_OUTBOX === "on" : e.NODE_ENV !== "production",
    staticDir: e.STATIC_DIR,
    authRateLimit: { windowMs: 15 * 60_000, max: 20 },
    exportLimitBytes: Math.round(e.EXPORT_LIMIT_MB * 1_048_576),
    tokenRateLimit: { windowMs: 60 * 60_000, max: 20 },
    webProcesses: e.WEB_PROCESSES ?? (e.NODE_ENV === "production" ? os.availableParallelism() : 1),
  };
}
