import { hash, verify } from "@node-rs/argon2";

/**
 * argon2id with the OWASP Password Storage Cheat Sheet's first recommended setting
 * (m = 19 MiB, t = 2, p = 1). The PHC string keeps the parameters, so raising them later
 * still verifies old hashes.
 */
// `algorithm: 2` is Algorithm.Argon2id, a const enum that cannot be imported at run time.
const argon2Options = { algorithm: 2, memoryCost: 19456, timeCost: 2, parallelism: 1 } as const;

// NFC so that the same characters typed on different keyboards give the same password.
export function hashPassword(password: string): Promise<string> {
  return hash(password.normalize("NFC"), argon2Options);
}

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password.normalize("NFC"));
  } catch {
    return false;
  }
}

/** A hash that matches nothing, verified when the account does not exist so that timing does not tell. */
let decoyHash: Promise<string> | undefined;
export async function verifyAgainstDecoy(password: string): Promise<false> {
  decoyHash ??= hashPassword("no account has this password: it only costs the same time");
  await verifyPassword(await decoyHash, password);
  return false;
}
