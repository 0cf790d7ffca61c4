// Password hashing with argon2id (the @node-rs/argon2 default algorithm), OWASP's minimum parameters:
// 19 MiB memory, 2 iterations, 1 lane (OWASP Password Storage Cheat Sheet).
import { hash, verify } from "@node-rs/argon2";
import { ZxcvbnFactory } from "@zxcvbn-ts/core";
import * as zxcvbnCommon from "@zxcvbn-ts/language-common";
import * as zxcvbnEn from "@zxcvbn-ts/language-en";

const OPTIONS = { memoryCost: 19456, timeCost: 2, parallelism: 1, outputLen: 32 } as const;

// The length bounds live in the contracts (the request schemas and the web forms use them too).
import { PASSWORD_MAX, PASSWORD_MIN } from "@stackproof/contracts";
export { PASSWORD_MAX, PASSWORD_MIN };

/** zxcvbn score a new password must reach: 3 = "safely unguessable: moderate protection from offline attack". */
export const PASSWORD_MIN_SCORE = 3;

let estimator: ZxcvbnFactory | undefined;
/** Built on first use: loading the dictionaries takes about a second. */
function strengthEstimator(): ZxcvbnFactory {
  estimator ??= new ZxcvbnFactory({
    dictionary: { ...zxcvbnCommon.dictionary, ...zxcvbnEn.dictionary },
    graphs: zxcvbnCommon.adjacencyGraphs,
    translations: zxcvbnEn.translations,
  });
  return estimator;
}

/**
 * Why `password` may not be used, or null when it may: 12 to 200 characters and a zxcvbn score of at least 3,
 * where the person's own e-mail, name and the product name count as guessable words.
 */
export function passwordProblem(password: string, personal: readonly string[] = []): string | null {
  if (password.length < PASSWORD_MIN) return `Use at least ${PASSWORD_MIN} characters.`;
  if (password.length > PASSWORD_MAX) return `Use at most ${PASSWORD_MAX} characters.`;
  // Whole strings, squashed ("ingridsolberg") and word by word, so no part of the person's own data helps.
  const inputs = [
    "stackproof",
    "halvorsen",
    ...personal.flatMap((p) => {
      const lower = p.toLowerCase();
      return [lower, lower.replace(/[^a-z0-9]+/g, ""), ...lower.split(/[^a-z0-9]+/)];
    }),
  ].filter((w) => w.length > 2);
  const result = strengthEstimator().check(password, inputs);
  if (result.score >= PASSWORD_MIN_SCORE) return null;
  const hint = [result.feedback.warning, ...result.feedback.suggestions].filter(Boolean).join(" ");
  return `This password is too easy to guess.${hint ? ` ${hint}` : ""} A few unrelated words make a strong one.`;
}

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
