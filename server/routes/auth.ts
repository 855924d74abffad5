import type { Router } from "express";
import { rateLimit, ipKeyGenerator } from "express-rate-limit";
import {
  PasswordResetConfirmSchema,
  PasswordResetRequestSchema,
  SignInSchema,
  SignUpSchema,
} from "../../shared/schemas/auth";
import type { AppDeps } from "../app";
import { HttpError } from "../http/errors";
import { acceptInvitation } from "../services/invitations";
import { confirmPasswordReset, requestPasswordReset } from "../services/password-reset";
import { createUser, verifyCredentials } from "../services/users";

export function authRoutes(r: Router, deps: AppDeps): void {
  const { db, config } = deps;
  // Per client address and e-mail, so one noisy address cannot lock everyone out.
  const limiter = rateLimit({
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

  r.post("/auth/sign-up", limiter, async (req, res) => {
    const input = SignUpSchema.parse(req.body);
    const { user, joinedStudyId } = await db.transaction(async (tx) => {
      const user = await createUser(tx, input);
      const joined = input.invitationToken ? await acceptInvitation(tx, input.invitationToken, user) : null;
      return { user, joinedStudyId: joined?.studyId };
    });
    await login(req, user);
    res.status(201).json({ user, ...(joinedStudyId ? { joinedStudyId } : {}) });
  });

  r.post("/auth/sign-in", limiter, async (req, res) => {
    const input = SignInSchema.parse(req.body);
    const user = await verifyCredentials(db, input.email, input.password);
    if (!user) throw new HttpError(401, "E-mail or password is wrong.");
    await login(req, user);
    res.json({ user });
  });

  r.post("/auth/sign-out", async (req, res) => {
    await new Promise<void>((resolve, reject) => req.logout((err) => (err ? reject(err) : resolve())));
    res.status(204).end();
  });

  r.post("/auth/password-reset/request", limiter, async (req, res) => {
    const input = PasswordResetRequestSchema.parse(req.body);
    await requestPasswordReset(db, { mailer: deps.mailer, publicUrl: config.publicUrl }, input.email);
    res.status(202).json({ message: "If an account uses that address, a reset link is on its way. It works once, for 30 minutes." });
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
