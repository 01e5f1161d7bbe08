// Bearer secrets (invitation links, API tokens): random, shown once, stored only as their SHA-256.
import { createHash, randomBytes } from "node:crypto";

export const hashToken = (token: string): string => createHash("sha256").update(token).digest("hex");

/** 256 random bits; `prefix` makes a leaked API token recognisable in logs and secret scanners. */
export function newSecretToken(prefix = ""): string {
  return `${prefix}${randomBytes(32).toString("base64url")}`;
}
