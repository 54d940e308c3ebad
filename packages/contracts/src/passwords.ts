import { z } from "zod";

// Password rules, shared by every form that sets a password and by the server, which checks them again.

export const MIN_PASSWORD_CHARS = 12;
export const MAX_PASSWORD_CHARS = 200;

/** The rules in the words the forms show above the password box. */
export const PASSWORD_RULES_TEXT = `At least ${MIN_PASSWORD_CHARS} characters; not your e-mail address or name; not a commonly used password. A few unrelated words make a good one.`;

/**
 * A small list of passwords that are long enough for the length rule but guessed first by anyone trying (keyboard
 * runs, repeated words, the product's own name and its published demo password). Compared without regard to case.
 * Assembled from common patterns (from memory of public breach lists, no single source).
 */
export const COMMON_PASSWORDS: readonly string[] = [
  "123456789012", "1234567890123", "12345678901234", "123456789012345", "1234567890qwerty", "123456123456",
  "111111111111", "000000000000", "121212121212", "123123123123", "987654321098", "098765432109",
  "qwertyuiopas", "qwertyuiop12", "qwertyuiop123", "qwerty123456", "qwerty1234567", "1q2w3e4r5t6y", "1qaz2wsx3edc",
  "q1w2e3r4t5y6", "zaq12wsxcde3", "asdfghjkl123", "asdfghjklqwe", "zxcvbnm12345", "qazwsxedcrfv", "qwertyqwerty",
  "password1234", "password12345", "password123456", "passwordpassword", "password!234", "p@ssw0rd1234", "passw0rd1234",
  "mypassword123", "newpassword1", "changeme1234", "changemenow1", "letmein12345", "welcome12345", "welcome123456",
  "iloveyou1234", "iloveyou12345", "administrator", "administrator1", "admin1234567", "adminadmin12", "adminpassword",
  "trustno112345", "sunshine1234", "football1234", "baseball1234", "princess1234", "superman1234", "starwars1234",
  "monkey123456", "dragon123456", "master123456", "whatever1234", "abcdefghijkl", "abcdef123456", "abc123456789",
  "aaaaaaaaaaaa", "abcabcabcabc", "secret123456", "letmeinplease", "correcthorsebatterystaple", "calmcrest-demo",
  "calmcrest1234", "calmcrest123", "calmcrestcalmcrest", "observatory1", "observatory123", "telescope123",
  "telescope1234", "seeing123456", "mountaintop1", "summer202520", "winter202520", "spring2026!!", "autumn2026!!",
  "january2026!", "december2026", "qwertyuiopasdfgh", "1234qwerasdf", "qwer1234asdf", "asdf1234qwer", "1234abcd1234",
];

const COMMON = new Set(COMMON_PASSWORDS.map((password) => password.toLowerCase()));

const squeeze = (value: string) => value.toLowerCase().replace(/[^\p{L}\p{N}]/gu, "");

/**
 * What is wrong with a password for this person, in plain sentences (empty when it is acceptable): too short, too
 * long, the e-mail address or its name part or the person's name inside it, or on the list of common passwords.
 */
export function passwordProblems(password: string, person: { email: string; name: string }): string[] {
  const problems: string[] = [];
  if (password.length < MIN_PASSWORD_CHARS) problems.push(`Use at least ${MIN_PASSWORD_CHARS} characters (this one has ${password.length}).`);
  if (password.length > MAX_PASSWORD_CHARS) problems.push(`Use at most ${MAX_PASSWORD_CHARS} characters.`);
  const squeezed = squeeze(password);
  const email = person.email.trim().toLowerCase();
  const localPart = squeeze(email.split("@")[0] ?? "");
  const name = squeeze(person.name);
  if (
    (email !== "" && password.toLowerCase().includes(email)) ||
    (localPart.length >= 4 && squeezed.includes(localPart)) ||
    (name.length >= 4 && squeezed.includes(name))
  ) {
    problems.push("Do not use your e-mail address or your name in the password.");
  }
  if (COMMON.has(password.toLowerCase()) || COMMON.has(squeezed)) problems.push("This is a commonly used password that is guessed early; choose another.");
  return problems;
}

/** A password box: only the length here; the rules that need the person are added with `withPasswordRules`. */
export const passwordField = z.string().max(MAX_PASSWORD_CHARS, `Use at most ${MAX_PASSWORD_CHARS} characters.`);

/** Adds the password rules to a schema whose object has `password` plus the person's `email` and `name`. */
export function checkPasswordRules(value: { password: string; email: string; name: string }, context: z.RefinementCtx): void {
  for (const message of passwordProblems(value.password, value)) context.addIssue({ code: "custom", message, path: ["password"] });
}
