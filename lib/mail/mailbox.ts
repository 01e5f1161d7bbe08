import { mailConfig } from "@/lib/config";

/** The development mailbox exists only while the local fake SMTP receiver stands in for real mail. */
export function mailboxEnabled(): boolean {
  return mailConfig.fake();
}
