/**
 * Random tokens and their stored form, after Lucia's "sessions from scratch" guide: the browser (or the
 * e-mail) gets the token, the database only its SHA-256, so a leaked table opens nothing.
 */
import { sha256 } from "@oslojs/crypto/sha2";
import { encodeBase32LowerCaseNoPadding, encodeHexLowerCase } from "@oslojs/encoding";

/** 20 random bytes (160 bits) by default, base32 lower case without padding: safe in URLs and cookies. */
export function generateToken(byteLength = 20): string {
  const bytes = new Uint8Array(byteLength);
  crypto.getRandomValues(bytes);
  return encodeBase32LowerCaseNoPadding(bytes);
}

/** SHA-256 of the token, hex: what the database keeps. A fast hash suffices because the token is random. */
export function hashToken(token: string): string {
  return encodeHexLowerCase(sha256(new TextEncoder().encode(token)));
}
