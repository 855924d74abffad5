import { desc } from "drizzle-orm";
import type { MailMessage } from "../../shared/schemas/studies";
import type { Db } from "../db/client";
import { mailOutbox } from "../db/schema";

const LINK = /https?:\/\/[^\s<>"')]+/g;

export async function listCaughtMail(db: Db, limit = 100): Promise<MailMessage[]> {
  const rows = await db.select().from(mailOutbox).orderBy(desc(mailOutbox.id)).limit(limit);
  return rows.map((r) => ({
    id: String(r.id),
    to: r.to,
    from: r.from,
    subject: r.subject,
    text: r.text,
    links: [...new Set(r.text.match(LINK) ?? [])],
    receivedAt: r.receivedAt.toISOString(),
  }));
}
