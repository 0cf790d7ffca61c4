// Checks a response body against its contract schema (packages/contracts): the schema must accept the body and
// must not drop or change anything, so a field the server sends but the contract leaves out fails here, not in
// the browser (zod objects strip unknown keys, which would silently hide the field from the web app).
import { expect } from "vitest";
import { z } from "zod";

export function expectContract<T extends z.ZodType>(schema: T, body: unknown, where = "response"): z.infer<T> {
  const result = schema.safeParse(body);
  if (!result.success) throw new Error(`${where} does not match its contract:\n${z.prettifyError(result.error)}`);
  expect(result.data, `${where}: the contract drops or changes a field`).toStrictEqual(body);
  return result.data;
}
