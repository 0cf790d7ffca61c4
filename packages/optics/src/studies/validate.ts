import type { z } from "zod";

/** Short, JSON-like rendering of an offending value for error messages. */
export function describeValue(value: unknown): string {
  if (value === undefined) return "undefined (missing)";
  if (typeof value === "string")
    return JSON.stringify(value.length > 60 ? `${value.slice(0, 57)}...` : value);
  if (typeof value === "number" || typeof value === "boolean" || value === null) return String(value);
  if (Array.isArray(value)) return `an array of ${value.length}`;
  return "an object";
}

/**
 * Validate `input` with a zod schema; on failure throw a RangeError naming the field path
 * (prefixed by `what`), the rule that failed and the offending value, on one line.
 */
export function parseWith<S extends z.ZodType>(schema: S, input: unknown, what: string): z.output<S> {
  const result = schema.safeParse(input, { reportInput: true });
  if (result.success) return result.data;
  const issue = result.error.issues[0];
  if (!issue) throw new RangeError(`${what}: invalid input`);
  const path = issue.path.map((p) => (typeof p === "number" ? `[${p}]` : `.${String(p)}`)).join("");
  const got = "input" in issue ? issue.input : undefined;
  if (got === undefined && issue.code === "invalid_type") {
    throw new RangeError(`${what}${path}: required field is missing (expected ${issue.expected})`);
  }
  const value = describeValue(got);
  throw new RangeError(`${what}${path}: ${issue.message}, got ${value}`);
}
