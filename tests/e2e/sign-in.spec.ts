import { expect, test } from "@playwright/test";
import { account, firstLink, signInAs, signInWithPassword, waitForMail } from "./support/helpers";

test("a wrong password shows a clear message", async ({ page }) => {
  await signInWithPassword(page, account("reviewer").email, "not-the-password");
  await expect(page.getByRole("form", { name: "Sign in with password" }).getByRole("alert")).toContainText("That e-mail address and password do not match an account.");
  await expect(page).toHaveURL(/\/sign-in/);
});

test("malformed, empty and oversized input get messages, not errors", async ({ page }) => {
  await page.goto("/sign-in");
  const form = page.getByRole("form", { name: "Sign in with password" });
  await form.getByLabel("E-mail").fill("not-an-address");
  await form.getByRole("button", { name: "Sign in" }).click();
  await expect(form.getByText("Enter a valid e-mail address, like name@example.org.")).toBeVisible();
  await expect(form.getByText("Enter your password.")).toBeVisible();
  await form.getByLabel("E-mail").fill(`${"x".repeat(300)}@example.org`);
  await form.getByLabel("Password").fill("y".repeat(500));
  await form.getByRole("button", { name: "Sign in" }).click();
  await expect(form.getByText("An e-mail address has at most 254 characters.")).toBeVisible();
  await expect(form.getByText("Use at most 200 characters.")).toBeVisible();
  // The API answers bad input with 400 and per-field messages.
  await signInAs(page, "viewer");
  const response = await page.request.post("/api/v1/analytic/erlang-b", { data: { servers: 30, traffic: -1 } });
  expect(response.status()).toBe(400);
  const body = await response.json();
  expect(Object.keys(body.error.fields)).toContain("traffic");
  const malformed = await page.request.post("/api/v1/analytic/erlang-b", { headers: { "content-type": "application/json" }, data: "{not json" });
  expect(malformed.status()).toBe(400);
});

test("repeated failures for one address are refused for a while", async ({ page }) => {
  const email = `locked-${Date.now()}@kestrel-fen.test`;
  for (let i = 0; i < 5; i++) {
    await signInWithPassword(page, email, `wrong-${i}`);
    await expect(page.getByRole("form", { name: "Sign in with password" }).getByRole("alert")).toContainText("do not match an account");
  }
  await signInWithPassword(page, email, "wrong-again");
  await expect(page.getByRole("form", { name: "Sign in with password" }).getByRole("alert")).toContainText("Too many failed attempts");
});

test("the sign-in link arrives at the fake SMTP server and signs in", async ({ page }) => {
  const { email } = account("engineer");
  const since = new Date(Date.now() - 1000);
  await page.goto("/sign-in");
  await page.getByRole("tab", { name: "E-mail link" }).click();
  const form = page.getByRole("form", { name: "Sign in with an e-mail link" });
  await form.getByLabel("E-mail").fill(email);
  await form.getByRole("button", { name: "Send me a sign-in link" }).click();
  await expect(page.getByRole("heading", { name: "Check your e-mail" })).toBeVisible();
  const mail = await waitForMail(email, since);
  expect(mail.subject).toBe("Your Spillway sign-in link");
  await page.goto(firstLink(mail.textBody));
  await expect(page).toHaveURL(/\/w\/kestrel-fen$/);
  await expect(page.getByTestId("signed-in-as")).toContainText("Eli Reed");
  // A link works once.
  await page.context().clearCookies();
  await page.goto(firstLink(mail.textBody));
  await expect(page.getByText("not valid any more")).toBeVisible();
});

test("sign-out ends the session", async ({ page }) => {
  await signInAs(page, "reviewer");
  await page.getByRole("button", { name: "Sign out" }).click();
  await expect(page.getByText("You are signed out.")).toBeVisible();
  await page.goto("/w/kestrel-fen");
  await expect(page).toHaveURL(/\/sign-in\?returnTo=/);
  const api = await page.request.get("/api/v1/workspaces");
  expect(api.status()).toBe(401);
});
