import connectPgSimple from "connect-pg-simple";
import cookieParser from "cookie-parser";
import express, { Router, type Express, type RequestHandler } from "express";
import session from "express-session";
import helmet from "helmet";
import fs from "node:fs";
import path from "node:path";
import passport from "passport";
import "./auth/types";
import { csrfProtection } from "./auth/csrf";
import type { Config } from "./config";
import type { Database } from "./db/client";
import { apiNotFound, errorHandler, HttpError } from "./http/errors";
import { storableText } from "./http/storable-text";
import type { Mailer } from "./mail/mailer";
import { accountRoutes } from "./routes/account";
import { authRoutes } from "./routes/auth";
import { climateRoutes } from "./routes/climate";
import { devMailRoutes } from "./routes/dev-mail";
import { leverRoutes } from "./routes/levers";
import { fieldDataRoutes } from "./routes/field-data";
import { lifeCycleRoutes } from "./routes/life-cycles";
import { reviewRoutes } from "./routes/review";
import { reportRoutes } from "./routes/reports";
import { runRoutes } from "./routes/runs";
import type { RunKinds } from "./runs/kinds";
import type { JobSender } from "./runs/queue";
import { studyRoutes } from "./routes/studies";
import { tokenScopeCheck } from "./auth/token-scope";
import { checkApiToken } from "./services/api-tokens";
import { findUserById } from "./services/users";

export interface AppDeps extends Database {
  config: Config;
  mailer: Mailer;
  /** What runs can compute, and the queue their chunks go to. */
  kinds: RunKinds;
  jobs: JobSender;
}

export const API_PREFIX = "/api/v1";
/** Largest JSON body accepted (a 500-stage life cycle with formulas fits comfortably). */
export const JSON_LIMIT = "5mb";

/** Every JSON route, on one router so tests can enumerate what is mounted. */
export function createApiRouter(deps: AppDeps): Router {
  const r = Router();
  r.get("/health", async (_req, res) => {
    await deps.pool.query("select 1");
    res.json({ ok: true });
  });
  authRoutes(r, deps);
  accountRoutes(r, deps);
  studyRoutes(r, deps);
  lifeCycleRoutes(r, deps);
  runRoutes(r, deps);
  reviewRoutes(r, deps);
  leverRoutes(r, deps);
  fieldDataRoutes(r, deps);
  reportRoutes(r, deps);
  climateRoutes(r, deps);
  if (deps.config.mailOutbox) devMailRoutes(r, deps);
  return r;
}

export function createApp(deps: AppDeps): Express {
  const { config, db, pool } = deps;
  const app = express();
  app.disable("x-powered-by");
  // JSON answers are computed afresh for each request and nothing revalidates them: hashing every one for an ETag only cost time.
  // (Static files keep their own ETags.)
  app.disable("etag");
  app.set("trust proxy", "loopback");
  app.use(helmet({ contentSecurityPolicy: { directives: { "img-src": ["'self'", "data:", "blob:"], "upgrade-insecure-requests": null } } }));

  const api = express.Router();
  api.use(express.json({ limit: JSON_LIMIT }));
  api.use(storableText);
  // Scripts authenticate with `Authorization: Bearer <token>` and carry no cookie credentials, so their
  // requests skip the cookie, session and CSRF layers altogether (no session row is read or minted).
  const cookieAuth = Router();
  // Secure cookies when the public address is https, and also for any request that came over TLS
  // (through a proxy on loopback saying X-Forwarded-Proto: https) while PUBLIC_URL is left http.
  const https = config.publicUrl.startsWith("https:");
  cookieAuth.use(cookieParser());
  const PgStore = connectPgSimple(session);
  cookieAuth.use(
    session({
      store: new PgStore({ pool, tableName: "session", createTableIfMissing: false }),
      name: "sw_session",
      secret: config.sessionSecret,
      resave: false,
      saveUninitialized: false,
      rolling: true,
      cookie: { httpOnly: true, sameSite: "lax", secure: https || "auto", maxAge: 14 * 86_400_000 },
    }),
  );
  // One Passport per app: the module's shared instance would keep the first app's database lookup for every app in the process.
  const authn = new passport.Passport();
  authn.serializeUser((user, done) => done(null, user.id));
  authn.deserializeUser((id: string, done) => {
    findUserById(db, id).then((u) => done(null, u ?? false), done);
  });
  cookieAuth.use(authn.initialize());
  cookieAuth.use(authn.session());
  cookieAuth.use((req, _res, next) => {
    if (req.user) req.authVia = "session";
    next();
  });
  cookieAuth.use(csrfProtection(config.sessionSecret, { secureCookie: https }));

  const bearerAuth: RequestHandler = async (req, _res, next) => {
    const match = /^Bearer\s+(\S+)$/i.exec(req.get("authorization")!);
    if (!match) return next(new HttpError(401, "The Authorization header must be “Bearer <token>”."));
    const check = await checkApiToken(db, match[1]!);
    if (!check.ok) return next(new HttpError(401, check.message));
    req.user = check.user;
    req.authVia = "token";
    req.tokenScope = check.scope;
    next();
  };
  api.use((req, res, next) => (!req.headers.authorization ? cookieAuth(req, res, next) : bearerAuth(req, res, next)));
  api.use(tokenScopeCheck);
  api.use(createApiRouter(deps));
  api.use(apiNotFound);
  app.use(API_PREFIX, api);
  app.use("/api", apiNotFound);

  if (config.staticDir && fs.existsSync(path.join(config.staticDir, "index.html"))) {
    const dir = config.staticDir;
    app.use(express.static(dir, { index: false, maxAge: "1h" }));
    // Single-page app: every other path is the client's (Express 5 spells the wildcard this way).
    // `root` keeps a build folder under a dot-folder (e.g. .data/dist in tests) servable.
    app.get("/{*splat}", (_req, res) => res.sendFile("index.html", { root: dir }));
  }
  app.use(errorHandler);
  return app;
}
