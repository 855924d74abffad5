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
  const passwordHash = await hashPassword(input.password);
  try {
    const [u] = await db.insert(users).values({ name: input.name, email: input.email, passwordHash }).returning();
    return publicUser(u!);
  } catch (err) {
    if (isUniqueViolation(err)) {
      // Sign-up has to say something here; the message does not say whether the address is registered
      // beyond what any sign-up form must, and points to the reset flow.
      throw new HttpError(409, "This e-mail cannot be used to create an account. If it is yours, sign in or reset your password.", "conflict", [
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
