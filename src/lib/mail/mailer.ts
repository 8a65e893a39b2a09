import nodemailer, { type Transporter } from 'nodemailer';
import { getEnv } from '../server/env';
import type { MailMessage } from './templates';

let transport: Transporter | undefined;

/** Sends one message through SMTP_URL; resolves with the SMTP message id. */
export async function sendMail(message: MailMessage): Promise<string> {
  const env = getEnv();
  transport ??= nodemailer.createTransport(env.SMTP_URL);
  const info = await transport.sendMail({ from: env.MAIL_FROM, ...message });
  return info.messageId;
}
