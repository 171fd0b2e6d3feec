/**
 * Outgoing e-mail through nodemailer over SMTP (SMTP_URL), from MAIL_FROM: the one mail transport
 * of the process (invitations, spend-cap notices). In development and tests that is the maildev
 * stand-in on 127.0.0.1 (scripts/fakes.d/20-mail.sh); messages can be read at MAIL_WEB_URL.
 */
import "@/server/server-only";
import nodemailer, { type Transporter } from "nodemailer";
import { env } from "@/env";

export interface OutgoingMail {
  /** One address, or several for one message to all of them. */
  to: string | string[];
  subject: string;
  text: string;
  /** Without it the message is plain text only. */
  html?: string;
}

let transport: Transporter | undefined;
function transporter(): Transporter {
  if (!transport) transport = nodemailer.createTransport(env().SMTP_URL, { from: env().MAIL_FROM });
  return transport;
}

export class MailError extends Error {}

/** Sends one message; throws MailError naming the SMTP server when it cannot be delivered. */
export async function sendMail(mail: OutgoingMail): Promise<{ messageId: string }> {
  try {
    const info = await transporter().sendMail({ from: env().MAIL_FROM, ...mail });
    return { messageId: info.messageId };
  } catch (err) {
    const where = env().SMTP_URL.replace(/\/\/[^@/]*@/, "//");
    throw new MailError(`Could not send e-mail through ${where}: ${(err as Error).message}`);
  }
}

export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);
}
