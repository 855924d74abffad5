import nodemailer from "nodemailer";
import type { Config } from "../config";

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<void>;
  close(): void;
}

/** Sends through SMTP: the local fake in development and tests, a real provider in production. */
export function createMailer(smtp: Config["smtp"]): Mailer {
  const transport = nodemailer.createTransport({
    host: smtp.host,
    port: smtp.port,
    secure: smtp.secure,
    auth: smtp.user ? { user: smtp.user, pass: smtp.password ?? "" } : undefined,
    // The local fake has no certificate; a real provider is reached with TLS (SMTP_SECURE or STARTTLS).
    ignoreTLS: smtp.host === "127.0.0.1" || smtp.host === "localhost",
  });
  return {
    async send(mail) {
      await transport.sendMail({ from: smtp.from, to: mail.to, subject: mail.subject, text: mail.text });
    },
    close: () => transport.close(),
  };
}

/** Mail must never break the change that triggered it: failures are logged as warnings. */
export async function sendQuietly(mailer: Mailer, mail: OutgoingMail): Promise<boolean> {
  try {
    await mailer.send(mail);
    return true;
  } catch (err) {
    console.warn(`Could not send e-mail “${mail.subject}” to ${mail.to}: ${(err as Error).message}`);
    return false;
  }
}
