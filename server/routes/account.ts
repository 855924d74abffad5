import type { Router } from "express";
import { rateLimit } from "express-rate-limit";
import { ApiTokenCreateSchema, PasswordChangeSchema, ProfileUpdateSchema } from "../../shared/schemas/auth";
import type { AppDeps } from "../app";
import { HttpError } from "../http/errors";
import { rateLimitStore } from "../http/rate-limit-store";
import { currentUser, signedIn, uuidParam } from "../auth/authorize";
import { sessionOnly } from "../auth/token-scope";
import { createApiToken, listApiTokens, revokeApiToken } from "../services/api-tokens";
import { changePassword, updateProfile } from "../services/users";

export function accountRoutes(r: Router, { db, config }: AppDeps): void {
  // Per account: a script stuck in a loop (or a stolen session) cannot mint tokens without end.
  const mintLimiter = rateLimit({
    ...rateLimitStore("mint"),
    windowMs: config.tokenRateLimit.windowMs,
    limit: config.tokenRateLimit.max,
    standardHeaders: "draft-8",
    legacyHeaders: false,
    keyGenerator: (req) => `mint|${req.user?.id ?? ""}`,
    handler: (_req, _res, next) => next(new HttpError(429, `Too many new tokens: at most ${config.tokenRateLimit.max} in ${config.tokenRateLimit.windowMs / 60_000} minutes. Revoke ones you no longer use and try again later.`)),
  });

  r.patch("/account/profile", signedIn, async (req, res) => {
    const user = await updateProfile(db, currentUser(req).id, ProfileUpdateSchema.parse(req.body));
    res.json({ user });
  });

  r.post("/account/password", signedIn, sessionOnly, async (req, res) => {
    await changePassword(db, currentUser(req).id, PasswordChangeSchema.parse(req.body));
    res.status(204).end();
  });

  r.get("/account/tokens", signedIn, async (req, res) => {
    res.json(await listApiTokens(db, currentUser(req).id));
  });

  r.post("/account/tokens", signedIn, sessionOnly, mintLimiter, async (req, res) => {
    const { name, scope, expiresInDays } = ApiTokenCreateSchema.parse(req.body);
    res.status(201).json(await createApiToken(db, currentUser(req).id, name, { scope, expiresInDays }));
  });

  r.delete("/account/tokens/:tokenId", signedIn, sessionOnly, async (req, res) => {
    await revokeApiToken(db, currentUser(req).id, uuidParam(req, "tokenId"));
    res.status(204).end();
  });
}
