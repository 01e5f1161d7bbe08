import { describe, expect, it } from "vitest";
import bcrypt from "bcryptjs";
import { hashPassword, verifyPassword } from "@/lib/secrets/password";
import { emailSchema, newPasswordSchema, signInSchema } from "@/lib/schemas/account";

describe("password hashing", () => {
  it("round-trips and rejects other passwords", async () => {
    const hash = await hashPassword("correct horse battery");
    expect(hash).not.toContain("correct horse battery");
    expect(hash).toMatch(/^\$2[aby]\$11\$/);
    expect(await verifyPassword("correct horse battery", hash)).toBe(true);
    expect(await verifyPassword("correct horse batterY", hash)).toBe(false);
  });

  it("salts: the same password hashes differently each time", async () => {
    const [a, b] = await Promise.all([hashPassword("same-password-1"), hashPassword("same-password-1")]);
    expect(a).not.toBe(b);
  });

  it("verifies hashes made by bcryptjs directly (the format is standard bcrypt)", async () => {
    const foreign = bcrypt.hashSync("made-elsewhere-123", 4);
    expect(await verifyPassword("made-elsewhere-123", foreign)).toBe(true);
  });
});

describe("account input", () => {
  it("normalises e-mail addresses and names the problem", () => {
    expect(emailSchema.parse("  Someone@Example.ORG ")).toBe("someone@example.org");
    expect(emailSchema.safeParse("no-at-sign").error?.issues[0].message).toBe("Enter a valid e-mail address, like name@example.org.");
    expect(emailSchema.safeParse("").error?.issues[0].message).toBe("Enter an e-mail address.");
    expect(emailSchema.safeParse(`${"a".repeat(250)}@example.org`).error?.issues[0].message).toBe("An e-mail address has at most 254 characters.");
  });

  it("requires a password on sign-in and a long enough one when choosing", () => {
    const empty = signInSchema.safeParse({ email: "a@example.org", password: "" });
    expect(empty.error?.issues).toEqual([expect.objectContaining({ path: ["password"], message: "Enter your password." })]);
    expect(newPasswordSchema.safeParse("short").error?.issues[0].message).toBe("Use at least 10 characters.");
    expect(newPasswordSchema.safeParse("x".repeat(201)).error?.issues[0].message).toBe("Use at most 200 characters.");
  });
});
