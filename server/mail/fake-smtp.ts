import { simpleParser } from "mailparser";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { SMTPServer } from "smtp-server";
import { connect, type Db } from "../db/client";
import { mailOutbox } from "../db/schema";

/**
 * The local SMTP fake for development and tests: accepts every message on
 * loopback and stores it in mail_outbox, where the Mail outbox page reads it.
 */
export async function startFakeSmtp(db: Db, port: number, host = "127.0.0.1"): Promise<{ port: number; close: () => Promise<void> }> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS"],
    logger: false,
    size: 5 * 1024 * 1024,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("end", async () => {
        try {
          const raw = Buffer.concat(chunks).toString("utf8");
          const parsed = await simpleParser(raw);
          const to = session.envelope.rcptTo.map((r) => r.address).join(", ");
          await db.insert(mailOutbox).values({
            to,
            from: session.envelope.mailFrom ? session.envelope.mailFrom.address : "",
            subject: parsed.subject ?? "(no subject)",
            text: parsed.text ?? "",
            raw,
          });
          callback();
        } catch (err) {
          callback(err as Error);
        }
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, host, () => resolve());
  });
  const address = server.server.address();
  return {
    port: typeof address === "object" && address ? address.port : port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const { db, pool } = connect(process.env.DATABASE_URL ?? "", { max: 2 });
  const smtp = await startFakeSmtp(db, Number(process.env.SMTP_PORT ?? 2525));
  console.log(`Mail fake listening on 127.0.0.1:${smtp.port}`);
  const stop = async () => {
    await smtp.close();
    await pool.end();
    process.exit(0);
  };
  process.on("SIGTERM", stop);
  process.on("SIGINT", stop);
}
