import type { Request, RequestHandler, Response } from "express";
import { z } from "zod";
import { roleAtLeast, type Role } from "../../shared/schemas/studies";
import type { Db } from "../db/client";
import { HttpError, notFound, unauthorized } from "../http/errors";
import { membershipRole } from "../services/studies";
import type { SessionUser } from "./types";

const Uuid = z.uuid();

/** The signed-in user (session or Bearer token); only call after `signedIn` or a role check. */
export function currentUser(req: Request): SessionUser {
  if (!req.user) throw unauthorized();
  return req.user;
}

/** The Study and role resolved by a role check. */
export function studyAccess(res: Response): { studyId: string; role: Role } {
  const a = res.locals.access;
  if (!a) throw new Error("studyAccess() used on a route without a role check");
  return a;
}

/** A route parameter that must be a uuid: anything else cannot exist, so 404. */
export function uuidParam(req: Request, name: string): string {
  const v = req.params[name];
  if (typeof v !== "string" || !Uuid.safeParse(v).success) throw notFound();
  return v;
}

export const signedIn: RequestHandler = (req, _res, next) => {
  next(req.user ? undefined : unauthorized());
};

/**
 * The one authorisation check for Study resources: anonymous → 401,
 * not a member (or no such thing) → 404, member lacking the role → 403.
 * `findStudy` maps the request to the Study that owns the resource.
 */
export function roleCheck(db: Db, needed: Role, findStudy: (req: Request) => Promise<string | null>): RequestHandler {
  return async (req, res, next) => {
    if (!req.user) return next(unauthorized());
    const studyId = await findStudy(req);
    const role = studyId ? await membershipRole(db, studyId, req.user.id) : null;
    if (!studyId || !role) return next(notFound("Not found, or you are not a member of its Study."));
    if (!roleAtLeast(role, needed)) {
      return next(new HttpError(403, `This needs the ${needed} role in the Study; you are ${role === "owner" ? "an" : "a"} ${role}.`));
    }
    res.locals.access = { studyId, role };
    next();
  };
}

/** Role check for routes under /studies/:studyId. */
export const studyRole = (db: Db, needed: Role) => roleCheck(db, needed, async (req) => uuidParam(req, "studyId"));
