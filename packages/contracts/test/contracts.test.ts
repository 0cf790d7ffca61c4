// The request schemas that guard accounts and sign-off input, tried the way a client trying to get around them
// would (rules from the API's docs/api.md; common practice, no source).
import { describe, expect, it } from "vitest";
import {
  AcceptInvitationBody,
  AnchorSchema,
  ClientResultSchema,
  DeviationDecisionBody,
  DeviationRequestBody,
  EmailInput,
  MAX_PAGE_LIMIT,
  MAX_TRIALS_PER_RUN,
  PageQuery,
  TransitionBody,
  YieldRunBody,
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

describe("request schemas of the workflow and lists", () => {
  it("a transition names one of the five actions; return_to_review is the server's alone", () => {
    expect(TransitionBody.safeParse({ action: "approve", note: "ok" }).success).toBe(true);
    expect(TransitionBody.safeParse({ action: "return_to_review" }).success).toBe(false);
    expect(TransitionBody.safeParse({ action: "APPROVE" }).success).toBe(false);
  });

  it("a deviation needs a written reason (10 characters after trimming); a decision note defaults to empty", () => {
    expect(DeviationRequestBody.safeParse({ reason: "   too short   " }).success).toBe(false);
    expect(DeviationRequestBody.safeParse({ reason: "Customer agreed in writing." }).success).toBe(true);
    expect(DeviationDecisionBody.parse({ accept: false })).toEqual({ accept: false, note: "" });
    expect(DeviationDecisionBody.safeParse({ accept: "yes" }).success).toBe(false);
  });

  it("a yield run asks for at most MAX_TRIALS_PER_RUN whole trials; a browser result must carry what is compared", () => {
    expect(YieldRunBody.safeParse({ trials: MAX_TRIALS_PER_RUN + 1 }).success).toBe(false);
    expect(YieldRunBody.safeParse({ trials: 10.5 }).success).toBe(false);
    expect(YieldRunBody.safeParse({}).success).toBe(true);
    expect(ClientResultSchema.safeParse({ trials: 10, seed: "s", yield: 0.5 }).success).toBe(false);
  });

  it("an invitation is accepted with a token of plausible length", () => {
    expect(AcceptInvitationBody.safeParse({ token: "short", password: "x" }).success).toBe(false);
    expect(AcceptInvitationBody.safeParse({ token: "t".repeat(43), password: "x" }).success).toBe(true);
  });

  it("a page query defaults to 50 items and refuses more than the cap", () => {
    expect(PageQuery.parse({})).toEqual({ limit: 50 });
    expect(PageQuery.parse({ limit: "20", cursor: "abc" })).toEqual({ limit: 20, cursor: "abc" });
    expect(PageQuery.safeParse({ limit: MAX_PAGE_LIMIT + 1 }).success).toBe(false);
    expect(PageQuery.safeParse({ limit: 0 }).success).toBe(false);
  });
});

describe("response schemas", () => {
  it("drop fields they do not name (why the API suite compares the parsed body with the sent one)", () => {
    const page = pageSchema(PersonRefSchema);
    const parsed = page.parse({ items: [{ id: "u1", name: "Ana", email: "a@b.example" }], nextCursor: null });
    expect(parsed.items[0]).toEqual({ id: "u1", name: "Ana" });
  });
});
