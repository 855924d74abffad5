import type { DbOrTx } from "../db/client";
import { auditEvents } from "../db/schema";

export interface AuditEntry {
  studyId: string | null;
  actorId: string | null;
  action: string;
  summary: string;
  details?: Record<string, unknown>;
}

/** Records an activity row; pass the change's transaction so both land or neither does. */
export async function recordEvent(tx: DbOrTx, entry: AuditEntry): Promise<void> {
  await tx.insert(auditEvents).values({ ...entry, details: entry.details ?? {} });
}
