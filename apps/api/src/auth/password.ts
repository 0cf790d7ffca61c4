// Password hashing with argon2id (the @node-rs/argon2 default algorithm), OWASP's minimum parameters:
// 19 MiB memory, 2 iterations, 1 lane (OWASP Password Storage Cheat Sheet).
import { hash, verify } from "@node-rs/argon2";

const OPTIONS = { memoryCost: 19456, timeCost: 2, parallelism: 1, outputLen: 32 } as const;

export { PASSWORD_MAX, PASSWORD_MIN } from "@stackproof/contracts";

export function hashPassword(password: string): Promise<string> {
  return hash(password, OPTIONS);
}

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password);
  } catch {
    return false;
  }
}

let dummy: Promise<string> | undefined;
/** Spends the same time as a real check, so an unknown e-mail is not told apart by timing. */
export async function verifyAgainstDummy(password: string): Promise<false> {
  dummy ??= hashPassword("stackproof-timing-equaliser");
  await verifyPassword(await dummy, password);
  return false;
}

/** E-mail addresses are compared trimmed and in lower case. */
export function normalizeEmail(email: string): string {
  return email.trim().toLowerCase();
}
