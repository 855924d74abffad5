import type PgBoss from "pg-boss";
import type { Db } from "../db/client";
import { DIGEST_CRON, DIGEST_QUEUE, sendDigests, type NotifyDeps } from "../services/notifications";

/**
 * The daily digest on pg-boss's scheduler: one schedule row (any number of
 * workers share it; pg-boss sends each tick once), one job per day.
 */
export async function scheduleDigest(boss: PgBoss): Promise<void> {
  await boss.createQueue(DIGEST_QUEUE, { name: DIGEST_QUEUE, expireInSeconds: 15 * 60, retryLimit: 2, retryDelay: 60 });
  await boss.schedule(DIGEST_QUEUE, DIGEST_CRON, {}, { tz: "UTC" });
}

export async function workDigest(boss: PgBoss, db: Db, deps: NotifyDeps): Promise<void> {
  await boss.work(DIGEST_QUEUE, { batchSize: 1, pollingIntervalSeconds: 30 }, async () => {
    const sent = await sendDigests(db, deps);
    if (sent.digests > 0 || sent.retried > 0) console.log(`Daily digest: ${sent.digests} e-mails with ${sent.items} items; ${sent.retried} earlier messages re-sent.`);
  });
}
