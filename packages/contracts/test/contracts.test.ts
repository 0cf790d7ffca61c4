// The request schemas that guard accounts and sign-off input, tried the way a client trying to get around them
// would (rules from the API's docs/api.md; common practice, no source).
import { describe, expect, it } from "vitest";
import {
  AnchorSchema,
  EmailInput,
  NewPassword,
  PASSWORD_MAX,
  PASSWORD_MIN,
  ProgramPatchBody,
  RolesInput,
  pageSchema,
  PersonRefSchema,
} from "../src/index.ts";

describe("request schemas", () => {
  it("roles: at least one, each once, only known roles", () => {
    expect(RolesInput.safeParse(["reviewer"]).success).toBe(true);
    expect(RolesInput.safeParse([]).success).toBe(false);
    expect(RolesInput.safeParse(["admin", "admin"]).success).toBe(false);
    expect(RolesInput.safeParse(["owner"]).success).toBe(false);
  });

  it("passwords: the bounds are inclusive and enforced on both sides", () => {
    expect(NewPassword.safeParse("x".repeat(PASSWORD_MIN)).success).toBe(true);
    expect(NewPassword.safeParse("x".repeat(PASSWORD_MIN - 1)).success).toBe(false);
    expect(NewPassword.safeParse("x".repeat(PASSWORD_MAX)).success).toBe(true);
    expect(NewPassword.safeParse("x".repeat(PASSWORD_MAX + 1)).success).toBe(false);
  });

  it("e-mail addresses are trimmed and lower-cased, so one account cannot be invited twice by case", () => {
    expect(EmailInput.parse("  Ana.Berg@Halvorsen.EXAMPLE ")).toBe("ana.berg@halvorsen.example");
    expect(EmailInput.safeParse("not-an-address").success).toBe(false);
  });

  it("a program patch must change something", () => {
    expect(ProgramPatchBody.safeParse({}).success).toBe(false);
    expect(ProgramPatchBody.safeParse({ targetYield: 1.2 }).success).toBe(false);
    expect(ProgramPatchBody.safeParse({ targetYield: 0.9 }).success).toBe(true);
  });

  it("a range anchor cannot end before it starts", () => {
    expect(AnchorSchema.safeParse({ kind: "range", start: 500, stop: 400 }).success).toBe(false);
    expect(AnchorSchema.safeParse({ kind: "range", start: 400, stop: 500 }).success).toBe(true);
  });
});

describe("response schemas", () => {
  it("drop fields they do not name (why the API suite compares the parsed body with the sent one)", () => {
    const page = pageSchema(PersonRefSchema);
    const parsed = page.parse({ items: [{ id: "u1", name: "Ana", email: "a@b.example" }], nextCursor: null });
    expect(parsed.items[0]).toEqual({ id: "u1", name: "Ana" });
  });
});
