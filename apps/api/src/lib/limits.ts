// What one request may ask the server to compute: the limits live in the contracts (the request schemas use them);
// here they become 400 limit_exceeded answers.
import { HttpError } from "./errors.ts";
import type { LimitProblem } from "@stackproof/contracts";

export {
  MAX_LAYERS,
  MAX_POINTS_PER_BAND,
  MAX_SPEC_BANDS,
  MAX_TRIALS_PER_RUN,
  REQUEST_LIMITS,
  designLimitProblems,
  maskLimitProblems,
  refineMaskLimits,
  trialsLimitMessage,
  type LimitProblem,
} from "@stackproof/contracts";

/** Throws 400 limit_exceeded for the first problem, with every problem in details. */
export function assertWithinLimits(problems: LimitProblem[]): void {
  const first = problems[0];
  if (first) throw new HttpError(400, "limit_exceeded", first.message, problems);
}
