import type { Router } from "express";
import { rateLimit, ipKeyGenerator } from "express-rate-limit";
import {
  PasswordResetConfirmSchema,
  PasswordResetRequestSchema,
  SignInSchema,
  SignUpConfirmSchema,
  SignUpSchema,
} from "../../shared/schemas/auth";
import type { AppDeps } from "../app";
import { sessionOnly } from "../auth/token-scope";
import { HttpError } from "../http/errors";
import { rateLimitStore } from "../http/rate-limit-store";
import { confirmPasswordReset, requestPasswordReset } from "../services/password-reset";
import { confirmSignUp, requestSignUp, signUpPendingMessage } from "../services/sign-up";
import { verifyCredentials } from "../services/users";

export function authRoutes(r: Router, deps: AppDeps): void {
  const { db, config } = deps;
  // Per client address and e-mail, so one noisy address cannot lock everyone out.
  const limiter = rateLimit({
    ...rateLimitStore("auth"),
    windowMs: config.authRateLimit.windowMs,
    limit: config.authRateLimit.max,
    standardHeaders: "draft-8",
    legacyHeaders: false,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? "")}|${String(req.body?.email ?? "").toLowerCase()}`,
    handler: (_req, _res, next) => next(new HttpError(429, "Too many attempts. Wait a few minutes and try again.")),
  });

  r.get("/auth/session", (req, res) => {
    res.json({ user: req.user ?? null });
  });

  // The same answer (202) for a new and a registered address; the e-mail tells them apart. See services/sign-up.ts.
  r.post("/auth/sign-up", sessionOnly, limiter, async (req, res) => {
    const input = SignUpSchema.parse(req.body);
    const done = await requestSignUp(db, { mailer: deps.mailer, publicUrl: config.publicUrl }, input);
    if (!done) {
      res.status(202).json({ message: signUpPendingMessage(input.email) });
      return;
    }
    await login(req, done.user);
    res.status(201).json(done);
  });

  // The link carries 32 random bytes: guessing one is hopeless, so no limit is needed here.
  r.post("/auth/sign-up/confirm", sessionOnly, async (req, res) => {
    const { token } = SignUpConfirmSchema.parse(req.body);
    const done = await confirmSignUp(db, token);
    await login(req, done.user);
    res.status(201).json(done);
  });

  r.post("/auth/sign-in", sessionOnly, limiter, async (req, res) => {
    const input = SignInSchema.parse(req.body);
    const user = await verifyCredentials(db, input.email, input.password);
    if (!user) throw new HttpError(401, "E-mail or password is wrong.");
    await login(req, user);
    res.json({ user });
  });

  r.post("/auth/sign-out", sessionOnly, async (req, res) => {
    await new Promise<void>((resolve, reject) => req.logout((err) => (err ? reject(err) : resolve())));
    res.status(204).end();
  });

  r.post("/auth/password-reset/request", limiter, async (req, res) => {
    const input = PasswordResetRequestSchema.parse(req.body);
    // Answer first, then look the address up and mail: the answer's timing must not tell a registered address from another.
    res.status(202).json({ message: "If an account uses that address, a reset link is on its way. It works once, for 30 minutes." });
    await requestPasswordReset(db, { mailer: deps.mailer, publicUrl: config.publicUrl }, input.email).catch((err: Error) =>
      console.warn(`Password reset for a requested address failed after answering: ${err.message}`),
    );
  });

  r.post("/auth/password-reset/confirm", limiter, async (req, res) => {
    const input = PasswordResetConfirmSchema.parse(req.body);
    await confirmPasswordReset(db, input.token, input.password);
    res.status(204).end();
  });
}

/** Passport's login regenerates the session id (against session fixation) before storing the user. */
function login(req: Express.Request, user: Express.User): Promise<void> {
  return new Promise((resolve, reject) => req.login(user, (err) => (err ? reject(err) : resolve())));
}
