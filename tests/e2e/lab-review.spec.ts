import { expect, test } from "@playwright/test";
import { account, signInAs, waitForMail } from "./support/helpers";
import { screenshot } from "./support/lab";

// A reviewer approves a result with a comment; the submitter is e-mailed and the audit log has who and when.
test("reviewer approves a run with a comment and the submitter gets the e-mail", async ({ page, browser }) => {
  await signInAs(page, "reviewer");
  const waiting = page.getByTestId("waiting-review");
  const link = waiting.getByRole("link", { name: /Reed Lane help desk/ });
  await expect(link).toBeVisible();
  await link.click();
  await expect(page.getByTestId("verdict")).toBeVisible();
  await expect(page.getByTestId("review-status").first()).toHaveText("Not reviewed");

  // Requesting changes needs a comment; the form says so.
  await page.getByRole("button", { name: "Request changes" }).click();
  await expect(page.getByText("say what should change")).toBeVisible();

  const since = new Date();
  await page.getByLabel("Comment").fill("Extended Erlang B and the simulation agree on the retrying load; approved for the busy-hour plan.");
  await page.getByRole("button", { name: "Approve" }).click();
  await expect(page.getByTestId("review-comments")).toContainText("approved");
  await expect(page.getByTestId("review-status").first()).toHaveText("Approved");
  await screenshot(page, "run-review");

  const mail = await waitForMail(account("engineer").email, since, 30_000);
  expect(mail.subject).toMatch(/approved/i);

  // The admin reads the audit trail in a separate browser session (the reviewer's is still signed in).
  const adminContext = await browser.newContext();
  const admin = await adminContext.newPage();
  await signInAs(admin, "admin");
  await admin.goto("/w/kestrel-fen/audit");
  await expect(admin.getByRole("row").filter({ hasText: "review.approved" }).first()).toBeVisible();
  await adminContext.close();
});
