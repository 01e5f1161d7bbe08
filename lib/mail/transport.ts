import nodemailer, { type Transporter } from "nodemailer";

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
}

export function mailSender(): string {
  return process.env.MAIL_FROM ?? "Spillway <no-reply@spillway.test>";
}

let transporter: Transporter | undefined;

/** nodemailer over SMTP_URL; the local fake receiver speaks plain SMTP without STARTTLS. */
export function mailTransport(): Transporter {
  if (!transporter) {
    const url = process.env.SMTP_URL;
    if (!url) throw new Error("SMTP_URL is not set, so Spillway cannot send e-mail.");
    const isFake = process.env.SPILLWAY_FAKE_MAIL === "1";
    transporter = nodemailer.createTransport(url, isFake ? { ignoreTLS: true } : {});
  }
  return transporter;
}

export async function sendMail(mail: OutgoingMail): Promise<void> {
  await mailTransport().sendMail({ from: mailSender(), ...mail });
}
