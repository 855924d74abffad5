import { eq } from "drizzle-orm";
import type { PasswordChange, ProfileUpdate, SignUp } from "../../shared/schemas/auth";
import type { SessionUser } from "../auth/types";
import { dummyPasswordHash, hashPassword, verifyPassword } from "../auth/secrets";
import type { Db, DbOrTx } from "../db/client";
import { users } from "../db/schema";
import { badRequest, HttpError } from "../http/errors";
import { isUniqueViolation } from "../db/errors";

const publicUser = (u: { id: string; name: string; email: string }): SessionUser => ({ id: u.id, name: u.name, email: u.email });

export async function findUserById(db: DbOrTx, id: string): Promise<SessionUser | null> {
  const [u] = await db.select().from(users).where(eq(users.id, id));
  return u ? publicUser(u) : null;
}

export async function findUserByEmail(db: DbOrTx, email: string): Promise<SessionUser | null> {
  const [u] = await db.select().from(users).where(eq(users.email, email));
  return u ? publicUser(u) : null;
}

export async function createUser(db: DbOrTx, input: Pick<SignUp, "name" | "email" | "password">): Promise<SessionUser> {
  return insertUser(db, { name: input.name, email: input.email, passwordHash: await hashPassword(input.password) });
}

/**
 * Adds an account. Only called once the address has proved to be the
 * person's (an e-mailed link), so saying that it is taken reveals nothing new.
 */
export async function insertUser(db: DbOrTx, input: { name: string; email: string; passwordHash: string }): Promise<SessionUser> {
  try {
    const [u] = await db.insert(users).values(input).returning();
    return publicUser(u!);
  } catch (err) {
    if (isUniqueViolation(err)) {
      throw new HttpError(409, "You already have an account with this e-mail address. Sign in, or reset your password if you forgot it.", "conflict", [
        { path: "email", message: "Sign in or reset your password instead." },
      ]);
    }
    throw err;
  }
}

/** Returns the user when the password matches; null otherwise, in about the same time either way. */
export async function verifyCredentials(db: Db, email: string, password: string): Promise<SessionUser | null> {
  const [u] = await db.select().from(users).where(eq(users.email, email));
  if (!u) {
    await verifyPassword(await dummyPasswordHash(), password);
    return null;
  }
  return (await verifyPassword(u.passwordHash, password)) ? publicUser(u) : null;
}

export async function updateProfile(db: Db, userId: string, input: ProfileUpdate): Promise<SessionUser> {
  const [u] = await db.update(users).set({ name: input.name }).where(eq(users.id, userId)).returning();
  return publicUser(u!);
}

export async function changePassword(db: Db, userId: string, input: PasswordChange): Promise<void> {
  const [u] = await db.select().from(users).where(eq(users.id, userId));
  if (!u || !(await verifyPassword(u.passwordHash, input.currentPassword))) {
    throw badRequest("The current password is wrong.", [{ path: "currentPassword", message: "The current password is wrong." }]);
  }
  await setPassword(db, userId, input.newPassword);
}

export async function setPassword(db: DbOrTx, userId: string, password: string): Promise<void> {
  await db.update(users).set({ passwordHash: await hashPassword(password) }).where(eq(users.id, userId));
}
