import type { Router } from "express";
import type { AppDeps } from "../app";
import { listCaughtMail } from "../services/mail-outbox";

/** Development only: mounted when the config enables the Mail outbox (never in production). */
export function devMailRoutes(r: Router, { db }: AppDeps): void {
  r.get("/dev/mail", async (_req, res) => {
    res.json(await listCaughtMail(db));
  });
}
