import nodemailer, { type Transporter } from "nodemailer";

// SMTP_URL is the only setting: the local sink in development and tests, a real relay in production.
const globalForMail = globalThis as unknown as { halftripMailer?: Transporter };

function transporter(): Transporter {
  if (!globalForMail.halftripMailer) {
    const url = process.env.SMTP_URL;
    if (!url) throw new Error("SMTP_URL is not set");
    globalForMail.halftripMailer = nodemailer.createTransport(url);
  }
  return globalForMail.halftripMailer;
}

export const MAIL_FROM = process.env.MAIL_FROM ?? "Halftrip <no-reply@halftrip.test>";

export interface OutgoingMail {
  to: string | string[];
  subject: string;
  text: string;
  html?: string;
}

export async function sendMail(mail: OutgoingMail) {
  return transporter().sendMail({ from: MAIL_FROM, ...mail });
}

/** Base URL for links in e-mails: APP_URL in production, else the local server. */
export function appUrl(): string {
  return (process.env.APP_URL ?? process.env.NEXTAUTH_URL ?? `http://127.0.0.1:${process.env.PORT ?? 3000}`).replace(/\/$/, "");
}
