import nodemailer, { type Transporter } from "nodemailer";
import { env } from "../env";

// SMTP_URL is the only setting (lib/env.ts): the local sink in development and tests, a relay in production.
const globalForMail = globalThis as unknown as { halftripMailer?: Transporter };

function transporter(): Transporter {
  if (!globalForMail.halftripMailer) {
    globalForMail.halftripMailer = nodemailer.createTransport(env.smtpUrl);
  }
  return globalForMail.halftripMailer;
}


export interface OutgoingMail {
  to: string | string[];
  subject: string;
  text: string;
  html?: string;
}

export async function sendMail(mail: OutgoingMail) {
  return transporter().sendMail({ from: env.mailFrom, ...mail });
}

/** Base URL for links in e-mails: APP_URL in production, else the local server. */
export function appUrl(): string {
  return env.appUrl;
}
