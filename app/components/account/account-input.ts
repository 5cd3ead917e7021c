/** The forms of the account page, one schema told apart by `intent`, read on the server and in the browser. */
import { z } from "zod";
import { newPasswordField, passwordToCheck } from "~/lib/auth/password-policy";

const profile = z.object({ intent: z.literal("profile"), name: z.string().trim().min(1, "Enter your name.").max(120) });
const password = z
  .object({
    intent: z.literal("password"),
    currentPassword: passwordToCheck.default(""),
    newPassword: newPasswordField,
    confirmPassword: z.string(),
  })
  .refine((form) => form.newPassword === form.confirmPassword, {
    path: ["confirmPassword"],
    message: "The two passwords are not the same.",
  });
const endSession = z.object({ intent: z.literal("end-session"), sessionId: z.string().min(1) });
const signOutEverywhere = z.object({ intent: z.literal("sign-out-everywhere") });
const createToken = z.object({
  intent: z.literal("create-token"),
  tokenName: z.string().trim().min(1, "Name the token after what will use it.").max(80),
});
const revokeToken = z.object({ intent: z.literal("revoke-token"), tokenId: z.uuid() });
const calendarFeed = z.object({ intent: z.literal("calendar-feed") });

export const accountInput = z.discriminatedUnion(
  "intent",
  [profile, password, endSession, signOutEverywhere, createToken, revokeToken, calendarFeed],
  {
    error: "Unknown action.",
  },
);

/** Passwords never travel back into the page. */
export const passwordFields = ["currentPassword", "newPassword", "confirmPassword"];
