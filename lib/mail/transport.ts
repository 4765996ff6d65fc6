import "server-only";
import nodemailer, { type Transporter } from "nodemailer";
import type { MailContent } from "./templates";

const g = globalThis as unknown as { __sumfoldMail?: Transporter };

function transport(): Transporter {
  if (!g.__sumfoldMail) {
    const url = process.env.SMTP_URL;
    if (!url) throw new Error("SMTP_URL is not set");
    g.__sumfoldMail = nodemailer.createTransport(url);
  }
  return g.__sumfoldMail;
}

/** Sends one message. Mail failures are logged and reported as false: no portal action fails because of mail. */
export async function sendMail(to: string | string[], content: MailContent): Promise<boolean> {
  const recipients = (Array.isArray(to) ? to : [to]).filter(Boolean);
  if (recipients.length === 0) return true;
  try {
    await transport().sendMail({
      from: process.env.MAIL_FROM ?? "Sumfold <no-reply@sumfold.invalid>",
      to: recipients,
      subject: content.subject,
      text: content.text,
      html: content.html,
    });
    return true;
  } catch (e) {
    console.error("[sumfold] mail not sent", { to: recipients, subject: content.subject, error: (e as Error).message });
    return false;
  }
}
