import { hash, verify } from "@node-rs/argon2";
import { createHash, createHmac, randomBytes, timingSafeEqual } from "node:crypto";

// argon2id (the library's default algorithm) with its default cost parameters: ~110 ms hash+verify here.
export const hashPassword = (password: string): Promise<string> => hash(password);
export const verifyPassword = (passwordHash: string, password: string): Promise<boolean> =>
  verify(passwordHash, password).catch(() => false);

/** 32 random bytes, URL-safe: API tokens, invitation and reset links. */
export const newSecret = (): string => randomBytes(32).toString("base64url");
/** Secrets are stored only as their SHA-256 (hex). */
export const sha256 = (secret: string): string => createHash("sha256").update(secret).digest("hex");

export function hmac(key: string, value: string): string {
  return createHmac("sha256", key).update(value).digest("base64url");
}

export function safeEqual(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

/** A hash to verify against when the e-mail is unknown, so both paths take the same time. */
let dummyHash: Promise<string> | undefined;
export const dummyPasswordHash = (): Promise<string> => (dummyHash ??= hashPassword(newSecret()));
