// The details of error answers that pages show, parsed with their contracts (@stackproof/contracts): an answer
// whose details do not have the contract's shape shows no details rather than guessed ones.
import { CsvProblemsDetails, type CsvProblem } from "@stackproof/contracts";
import { ApiError } from "./api-client.ts";

export type { CsvProblem };

/** The row/column problems of a refused CSV upload (422 invalid_csv), or none. */
export function csvProblemsOf(error: unknown): CsvProblem[] {
  if (!(error instanceof ApiError) || error.code !== "invalid_csv") return [];
  const parsed = CsvProblemsDetails.safeParse(error.details);
  return parsed.success ? parsed.data : [];
}
