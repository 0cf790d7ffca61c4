// Error details are read with their contract: a 422 invalid_csv answer's problems; anything else, or details of
// another shape, gives nothing rather than a guess.
import { describe, expect, it } from "vitest";
import { ApiError } from "./api-client.ts";
import { csvProblemsOf } from "./api-errors.ts";

describe("error details", () => {
  it("reads the row/column problems of a refused CSV", () => {
    const problems = [
      { row: 2, column: "n", message: "not a number: abc" },
      { row: 1, column: "-", message: "the file has no header row" },
    ];
    expect(csvProblemsOf(new ApiError(422, "invalid_csv", "The file has errors.", problems))).toEqual(
      problems,
    );
  });

  it("shows no CSV problems for another error, details of another shape, or no error", () => {
    const validation = [{ path: "id", message: "use 1-64 letters" }];
    expect(
      csvProblemsOf(new ApiError(400, "validation_failed", "body.id: use 1-64 letters", validation)),
    ).toEqual([]);
    expect(csvProblemsOf(new ApiError(422, "invalid_csv", "bad", [{ row: "2", message: "x" }]))).toEqual([]);
    expect(csvProblemsOf(new Error("network"))).toEqual([]);
    expect(csvProblemsOf(null)).toEqual([]);
  });
});
