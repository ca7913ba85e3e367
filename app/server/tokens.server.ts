import { createHash, randomBytes } from "node:crypto";

/** A random URL-safe token (256 bits) for links in e-mails and session ids. */
export function randomToken(): string {
  return randomBytes(32).toString("base64url");
}

/** Tokens are stored only as their SHA-256, so a database reader cannot use them. */
export function tokenHash(token: string): string {
  return createHash("sha256").update(token).digest("hex");
}
