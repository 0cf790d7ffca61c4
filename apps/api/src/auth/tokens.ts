// Ids and single-use secrets. Tokens leave the server once (in an e-mail); only their sha-256 is stored.
import { createHash, randomBytes } from "node:crypto";
import { generateIdFromEntropySize } from "lucia";

/** A random opaque id (80 bits, base32 lower case). */
export function newId(): string {
  return generateIdFromEntropySize(10);
}

/** A fresh 32-byte secret, base64url encoded, and the hash to store. */
export function newToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString("base64url");
  return { token, hash: hashToken(token) };
}

export function hashToken(token: string): string {
  return createHash("sha256").update(token, "utf8").digest("hex");
}
