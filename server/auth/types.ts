import type { Role } from "../../shared/schemas/studies";

export interface SessionUser {
  id: string;
  name: string;
  email: string;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    // Passport's req.user; our sessions and Bearer tokens both resolve to this.
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends SessionUser {}
    interface Request {
      authVia?: "session" | "token";
      /** For Bearer requests: what the token may do. */
      tokenScope?: "read" | "read-write";
    }
    interface Locals {
      access?: { studyId: string; role: Role };
    }
  }
}
