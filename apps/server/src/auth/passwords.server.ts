import { randomBytes } from "node:crypto";
import { hash, verify } from "@node-rs/argon2";

/** The Argon2 calls, behind one object so a test can watch them. */
export const argon2 = { hash, verify };

// Argon2id with the library's defaults (memory-hard; 19 MiB, 2 passes: OWASP's minimum recommendation).
export const hashPassword = (password: string) => argon2.hash(password);

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await argon2.verify(passwordHash, password);
  } catch {
    return false;
  }
}

let dummyHash: Promise<string> | undefined;

/**
 * Checks a sign-in password against an account's hash, or, for an unknown e-mail, against a dummy hash with the
 * same parameters, so both answers take the time of one Argon2 verification and do not tell which accounts exist.
 */
/** Computes the dummy hash ahead of the first sign-in (start-up), so even the first unknown e-mail is not faster. */
export async function prepareSignInCheck(): Promise<void> {
  dummyHash ??= hashPassword(randomBytes(16).toString("hex"));
  await dummyHash;
}

export async function checkSignInPassword(passwordHash: string | undefined, password: string): Promise<boolean> {
  if (passwordHash !== undefined) return verifyPassword(passwordHash, password);
  dummyHash ??= hashPassword(randomBytes(16).toString("hex"));
  await verifyPassword(await dummyHash, password);
  return false;
}
