import { createHash, randomBytes } from "node:crypto";

/** API token secrets look like `trk_<43 base64url chars>`; only their sha256 is stored. */
export const TOKEN_PREFIX = "trk_";

export function newTokenSecret(): string {
  return TOKEN_PREFIX + randomBytes(32).toString("base64url");
}

export function hashToken(secret: string): string {
  return createHash("sha256").update(secret, "utf8").digest("hex");
}

/** What lists show to recognise a token (never enough to use it). */
export function displayPrefix(secret: string): string {
  return secret.slice(0, TOKEN_PREFIX.length + 6);
}

export function looksLikeToken(value: string): boolean {
  return value.startsWith(TOKEN_PREFIX) && value.length >= TOKEN_PREFIX.length + 20 && value.length <= 200;
}
