// A 409 stale_base answer's details are read with their contract (StaleBaseDetails); another 409, or details of
// another shape, gives null.
import { describe, expect, it } from "vitest";
import { ApiError } from "../../../lib/api-client.ts";
import { staleBaseOf } from "./create-revision.ts";

describe("staleBaseOf", () => {
  it("reads the base and latest revision of a stale save, and nothing from another 409", () => {
    const details = { baseRevision: { id: "r1", number: 1 }, latestRevision: { id: "r2", number: 2 } };
    expect(staleBaseOf(new ApiError(409, "stale_base", "saved meanwhile", details))).toEqual(details);
    expect(
      staleBaseOf(
        new ApiError(409, "stale_base", "x", { baseRevision: null, latestRevision: { id: "r2", number: 2 } }),
      ),
    ).toEqual({
      baseRevision: null,
      latestRevision: { id: "r2", number: 2 },
    });
    expect(staleBaseOf(new ApiError(409, "conflict", "other", details))).toBeNull();
    expect(staleBaseOf(new ApiError(409, "stale_base", "x", { latest: { id: "r2" } }))).toBeNull();
  });
});
