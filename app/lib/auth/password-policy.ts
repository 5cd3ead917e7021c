/**
 * What a new password must be, after NIST SP 800-63B: long enough, any characters (spaces and emoji
 * included, nothing truncated), and not one of the passwords everybody tries first. Shared by the
 * server and the forms.
 */
import { z } from "zod";

export const PASSWORD_MIN_LENGTH = 8;
/** NIST SP 800-63B asks for at least 64; argon2 hashes any length, so the cap only stops absurd posts. */
export const PASSWORD_MAX_LENGTH = 256;

/**
 * Passwords people pick most often (the 8-character-and-longer head of the public breach lists).
 * NIST SP 800-63B asks verifiers to refuse these; the list stays short on purpose.
 */
const commonPasswords = new Set([
  "password",
  "password1",
  "password12",
  "password123",
  "passw0rd",
  "p@ssw0rd",
  "p@ssword",
  "12345678",
  "123456789",
  "1234567890",
  "0123456789",
  "12341234",
  "11111111",
  "00000000",
  "88888888",
  "87654321",
  "11223344",
  "12121212",
  "123123123",
  "987654321",
  "147258369",
  "123qweasd",
  "qwertyui",
  "qwertyuiop",
  "qwerty12",
  "qwerty123",
  "qwerty1234",
  "1q2w3e4r",
  "1q2w3e4r5t",
  "1qaz2wsx",
  "zaq12wsx",
  "qazwsxedc",
  "asdfghjk",
  "asdfghjkl",
  "asdf1234",
  "abcd1234",
  "abc12345",
  "abcdefgh",
  "iloveyou",
  "iloveyou1",
  "sunshine",
  "princess",
  "football",
  "baseball",
  "basketball",
  "superman",
  "starwars",
  "whatever",
  "trustno1",
  "letmein1",
  "welcome1",
  "welcome123",
  "admin123",
  "administrator",
  "changeme",
  "computer",
  "internet",
  "michelle",
  "jennifer",
  "mustang1",
  "shadow12",
  "monkey12",
  "dragon12",
  "charlie1",
  "freedom1",
  "master12",
  "killer12",
  "access14",
  "loveme12",
  "secret12",
  "student1",
  "student123",
  "teacher1",
  "letmein123",
  "benchpost",
  "benchpost1",
]);

/**
 * A password to check against a stored hash (signing in, confirming a change): no new password may be
 * longer, so a longer one cannot match, and refusing it spares hashing a megabyte per attempt.
 */
export const passwordToCheck = z
  .string()
  .refine(
    (password) => [...password].length <= PASSWORD_MAX_LENGTH,
    `A password has at most ${PASSWORD_MAX_LENGTH} characters; check what was pasted.`,
  );

export type PasswordProblem = "too-short" | "too-long" | "too-common";

/** Why a new password is refused, or null. Length counts characters (code points), not bytes. */
export function passwordProblem(password: string): PasswordProblem | null {
  const length = [...password].length;
  if (length < PASSWORD_MIN_LENGTH) return "too-short";
  if (length > PASSWORD_MAX_LENGTH) return "too-long";
  if (commonPasswords.has(password.toLowerCase())) return "too-common";
  return null;
}

export const passwordProblemMessages: Record<PasswordProblem, string> = {
  "too-short": `Use at least ${PASSWORD_MIN_LENGTH} characters. A few unrelated words make a good password.`,
  "too-long": `Use at most ${PASSWORD_MAX_LENGTH} characters.`,
  "too-common": "This password is one of the most common ones. Choose one that nobody would guess.",
};

/** The zod field for a new password, with the messages above. */
export const newPasswordField = z.string().superRefine((password, context) => {
  const problem = passwordProblem(password);
  if (problem) context.addIssue({ code: "custom", message: passwordProblemMessages[problem] });
});
