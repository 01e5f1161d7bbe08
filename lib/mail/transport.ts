import nodemailer, { type Transporter } from "nodemailer";
import { mailConfig } from "@/lib/config";

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
  /** The workspace the message concerns; only such mail appears in that workspace's development mailbox. */
  workspaceId?: string;
  /** What the message is ("invitation", "run-finished", ...); sign-in links are never shown in a mailbox. */
  kind?: string;
}

/** Headers the fake receiver files messages by (harmless on real mail). */
export const mailHeaders = { workspace: "x-spillway-workspace", kind: "x-spillway-kind" } as const;

export function mailSender(): string {
  return mailConfig.from();
}

let transporter: Transporter | undefined;

/** nodemailer over SMTP_URL; the local fake receiver speaks plain SMTP without STARTTLS. */
export function mailTransport(): Transporter {
  if (!transporter) {
    const url = mailConfig.smtpUrl();
    if (!url) throw new Error("SMTP_URL is not set, so Spillway cannot send e-mail.");
    transporter = nodemailer.createTransport(url, mailConfig.fake() ? { ignoreTLS: true } : {});
  }
  return transporter;
}

export async function sendMail({ workspaceId, kind, ...mail }: OutgoingMail): Promise<void> {
  const headers: Record<string, string> = {};
  if (workspaceId) headers[mailHeaders.workspace] = workspaceId;
  if (kind) headers[mailHeaders.kind] = kind;
  await mailTransport().sendMail({ from: mailSender(), ...mail, headers });
}
