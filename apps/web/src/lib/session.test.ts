import { afterEach, describe, expect, it, vi } from "vitest";
import { createQueryClient } from "./query-client.ts";
import { hasRole, requireRole, requireSession, safeNext, type Session } from "./session.ts";
import { demoSession, stubApi } from "../../test/stub-api.ts";

afterEach(() => vi.unstubAllGlobals());

const session = demoSession as Session;

describe("session helpers", () => {
  it("hasRole is true for any of the given roles, false when signed out", () => {
    expect(hasRole(session, "designer")).toBe(true);
    expect(hasRole(session, "admin", "designer")).toBe(true);
    expect(hasRole(session, "approver")).toBe(false);
    expect(hasRole(null, "designer")).toBe(false);
  });

  it("safeNext keeps same-site paths only", () => {
    expect(safeNext("/materials?x=1")).toBe("/materials?x=1");
    expect(safeNext("//evil.example/")).toBe("/");
    expect(safeNext("https://evil.example/")).toBe("/");
    expect(safeNext("/\\evil.example")).toBe("/");
    expect(safeNext(null)).toBe("/");
  });

  it("requireSession redirects a signed-out visitor to sign-in with the page to come back to", async () => {
    stubApi({
      "GET /api/v1/auth/me": {
        status: 401,
        body: { error: { code: "unauthenticated", message: "Sign in." } },
      },
    });
    const thrown = await requireSession(
      new Request("http://localhost/programs/p1?tab=mask"),
      createQueryClient(),
    ).catch((e: unknown) => e);
    expect(thrown).toBeInstanceOf(Response);
    expect((thrown as Response).status).toBe(302);
    expect((thrown as Response).headers.get("Location")).toBe("/sign-in?next=%2Fprograms%2Fp1%3Ftab%3Dmask");
  });

  it("requireSession returns the session and requireRole refuses other roles with 403", async () => {
    stubApi({ "GET /api/v1/auth/me": demoSession });
    const client = createQueryClient();
    await expect(requireSession(new Request("http://localhost/"), client)).resolves.toEqual(demoSession);
    const refused = await requireRole(new Request("http://localhost/people"), ["admin"], client).catch(
      (e: unknown) => e,
    );
    expect((refused as Response).status).toBe(403);
    await expect(requireRole(new Request("http://localhost/"), ["designer"], client)).resolves.toEqual(
      demoSession,
    );
  });

  it("a server failure of /auth/me is an error, not a sign-out", async () => {
    stubApi({
      "GET /api/v1/auth/me": {
        status: 500,
        body: { error: { code: "internal", message: "Database down." } },
      },
    });
    await expect(requireSession(new Request("http://localhost/"), createQueryClient())).rejects.toThrow(
      "Database down.",
    );
  });
});
