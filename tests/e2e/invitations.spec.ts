import { expect, test } from "@playwright/test";
import { firstLink, signInAs, waitForMail } from "./support/helpers";

test("an admin invites someone, who sets a password through the link and joins with that role", async ({ page, browser }) => {
  const email = `new-engineer-${Date.now()}@kestrel-fen.test`;
  const since = new Date(Date.now() - 1000);
  await signInAs(page, "admin");
  await page.goto("/w/kestrel-fen/members");
  const form = page.getByRole("form", { name: "Invite a member" });
  await form.getByLabel("E-mail address").fill("bad address");
  await form.getByRole("button", { name: "Send invitation" }).click();
  await expect(form.getByText("Enter a valid e-mail address")).toBeVisible();
  await form.getByLabel("E-mail address").fill(email);
  await form.getByLabel("Role").selectOption("engineer");
  await form.getByRole("button", { name: "Send invitation" }).click();
  await expect(page.getByRole("list", { name: "Open invitations" })).toContainText(email);

  const mail = await waitForMail(email, since);
  expect(mail.subject).toContain("Kestrel Fen Exchange Study");
  const invitee = await browser.newPage();
  await invitee.goto(firstLink(mail.textBody));
  await expect(invitee.getByRole("heading", { name: "Join Kestrel Fen Exchange Study" })).toBeVisible();
  const accept = invitee.getByRole("form", { name: "Accept the invitation" });
  await accept.getByLabel("Your name").fill("Noor Brook");
  await accept.getByLabel("Choose a password").fill("short");
  await accept.getByLabel("Repeat the password").fill("short");
  await accept.getByRole("button", { name: "Create my account and join" }).click();
  await expect(accept.getByText("Use at least 10 characters.")).toBeVisible();
  await accept.getByLabel("Choose a password").fill("a-long-enough-password");
  await accept.getByLabel("Repeat the password").fill("a-long-enough-password");
  await accept.getByRole("button", { name: "Create my account and join" }).click();
  await expect(invitee).toHaveURL(/\/w\/kestrel-fen$/);
  await expect(invitee.getByTestId("signed-in-as")).toContainText("Noor Brook");
  await invitee.goto("/w/kestrel-fen/settings");
  await expect(invitee.getByRole("list", { name: "What your role allows" }).getByText("Queue simulation runs (allowed)")).toBeVisible();

  // The link is single-use.
  await invitee.goto(firstLink(mail.textBody));
  await expect(invitee.getByText("already accepted")).toBeVisible();
  await page.goto("/w/kestrel-fen/audit");
  await expect(page.getByRole("row").filter({ hasText: email }).filter({ hasText: "invitation.accepted" })).toBeVisible();

  // The admin changes the new member's role; the member's next page load reflects it.
  await page.goto("/w/kestrel-fen/members");
  await page.getByLabel(`Role of ${email}`).selectOption("viewer");
  await expect(page.getByText("Role changed to viewer.")).toBeVisible();
  await invitee.goto("/w/kestrel-fen/settings");
  await expect(invitee.getByRole("list", { name: "What your role allows" }).getByText("Queue simulation runs (not allowed)")).toBeAttached();

  // Admins read the captured mail in the development mailbox.
  await page.goto("/w/kestrel-fen/mailbox");
  await expect(page.getByRole("list", { name: "Captured mail" }).getByText(`to ${email}`)).toBeVisible();
});

test("the development mailbox is for admins only", async ({ page }) => {
  await signInAs(page, "engineer");
  await page.goto("/w/kestrel-fen/mailbox");
  await expect(page.getByRole("heading", { name: "Your role does not allow this" })).toBeVisible();
});
