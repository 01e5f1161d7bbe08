/** The development mailbox exists only while the local fake SMTP receiver stands in for real mail. */
export function mailboxEnabled(): boolean {
  return process.env.SPILLWAY_FAKE_MAIL === "1";
}
