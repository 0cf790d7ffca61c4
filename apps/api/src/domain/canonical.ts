// Content hash of a revision: sha-256 (hex) of the canonical JSON of {stack, specMask}.
import { createHash, randomBytes } from "node:crypto";

/**
 * Canonical JSON: object keys sorted by code point at every level, no whitespace, `undefined` members dropped,
 * arrays in order, numbers as JSON.stringify writes them. Two equal values always give the same text.
 */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== "object") {
    if (typeof value === "number" && !Number.isFinite(value))
      throw new RangeError(`canonicalJson: non-finite number ${value}`);
    return JSON.stringify(value) ?? "null";
  }
  if (Array.isArray(value))
    return `[${value.map((v) => (v === undefined ? "null" : canonicalJson(v))).join(",")}]`;
  const entries = Object.entries(value as Record<string, unknown>)
    .filter(([, v]) => v !== undefined)
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(",")}}`;
}

/** A mask's empty colour list says the same as no list: drop it so both hash alike. */
function withoutEmptyColour(specMask: unknown): unknown {
  if (specMask === null || typeof specMask !== "object" || Array.isArray(specMask)) return specMask;
  const m = specMask as Record<string, unknown>;
  if (!Array.isArray(m.colour) || m.colour.length > 0) return specMask;
  const { colour: _empty, ...rest } = m;
  return rest;
}

/** sha-256 hex of canonicalJson({stack, specMask}); an empty colour list hashes as none. */
export function revisionHash(stack: unknown, specMask: unknown): string {
  return createHash("sha256")
    .update(canonicalJson({ stack, specMask: withoutEmptyColour(specMask) }))
    .digest("hex");
}

/** Opaque random id (20 lowercase base-32 characters, 100 bits). */
export function newId(): string {
  const alphabet = "abcdefghijklmnopqrstuvwxyz234567";
  const bytes = randomBytes(20);
  let out = "";
  for (const b of bytes) out += alphabet[b & 31];
  return out;
}
