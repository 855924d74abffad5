import type { RequestHandler } from "express";
import { randomBytes } from "node:crypto";
import { HttpError } from "../http/errors";
import { hmac, safeEqual } from "./secrets";

export const CSRF_COOKIE = "sw_csrf";
export const CSRF_HEADER = "x-csrf-token";
const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * Signed double-submit cookie: the client echoes the readable cookie in the
 * X-CSRF-Token header on every write. Requests authenticated by a Bearer token
 * carry no cookie credentials and skip the check.
 */
/** `secureCookie`: always mark the cookie Secure; otherwise it is marked so on requests that came over TLS. */
export function csrfProtection(secret: string, options: { secureCookie: boolean }): RequestHandler {
  const sign = (nonce: string) => `${nonce}.${hmac(secret, nonce)}`;
  const valid = (token: string) => {
    const [nonce, mac] = token.split(".");
    return !!nonce && !!mac && safeEqual(mac, hmac(secret, nonce));
  };
  return (req, res, next) => {
    const cookie: string | undefined = req.cookies?.[CSRF_COOKIE];
    // Scripts with a Bearer token never use the cookie: do not mint one for every call.
    if (req.authVia !== "token" && (!cookie || !valid(cookie))) {
      res.cookie(CSRF_COOKIE, sign(randomBytes(16).toString("base64url")), {
        sameSite: "strict",
        secure: options.secureCookie || req.secure,
        httpOnly: false,
        path: "/",
      });
    }
    if (SAFE_METHODS.has(req.method) || req.authVia === "token") return next();
    const header = req.get(CSRF_HEADER);
    if (!cookie || !header || !valid(cookie) || !safeEqual(header, cookie)) {
      return next(new HttpError(403, "Missing or stale CSRF token: reload the page and try again.", "csrf"));
    }
    next();
  };
}
