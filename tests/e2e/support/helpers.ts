import { expect, type Page } from "@playwright/test";
import { Client } from "pg";
import { demoAccounts } from "../../../db/demo-data";

export const account = (role: "admin" | "engineer" | "reviewer" | "viewer") => demoAccounts.find((a) => a.email.startsWith(`${role}@`))!;

export async function signInWithPassword(page: Page, email: string, password: string) {
  await page.goto("/sign-in");
  const form = page.getByRole("form", { name: "Sign in with password" });
  await form.getByLabel("E-mail").fill(email);
  await form.getByLabel("Password").fill(password);
  await form.getByRole("button", { name: "Sign in" }).click();
}

export async function signInAs(page: Page, role: "admin" | "engineer" | "reviewer" | "viewer") {
  const a = account(role);
  await signInWithPassword(page, a.email, a.password);
  await expect(page).toHaveURL(/\/w\/kestrel-fen$/);
}

/** Polls the fake SMTP receiver's store for the newest message to `to` received after `since`. */
export async function waitForMail(to: string, since: Date, timeoutMs = 15_000): Promise<{ subject: string; textBody: string }> {
  const client = new Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  try {
    const deadline = Date.now() + timeoutMs;
    while (Date.now() < deadline) {
      const { rows } = await client.query(
        "select subject, text_body from captured_mail where $1 = any(envelope_to) and received_at >= $2 order by id desc limit 1",
        [to.toLowerCase(), since],
      );
      if (rows[0]) return { subject: rows[0].subject, textBody: rows[0].text_body };
      await new Promise((r) => setTimeout(r, 250));
    }
    throw new Error(`no mail to ${to} arrived within ${timeoutMs} ms`);
  } finally {
    await client.end();
  }
}

export function firstLink(text: string): string {
  const match = /https?:\/\/\S+/.exec(text);
  if (!match) throw new Error(`no link in: ${text}`);
  return match[0];
}
