// Verification of a browser-computed yield result against the server's own re-run.
import type { ErrorModel, YieldResult } from "@stackproof/optics";
import { canonicalJson } from "../domain/canonical.ts";

// The parts of a submitted YieldResult that verification reads live with the contracts (the run requests carry them).
export { ClientResultSchema, type ClientResult } from "@stackproof/contracts";

/** What verification compares (a parsed ClientResult, or any YieldResult). */
export interface ComparableResult {
  trials: number;
  seed: string;
  passCount: number;
  yield: number;
  interval: { low: number; high: number };
  bandFailures: { id: string; count: number }[];
  errorModel: ErrorModel;
  engineVersion?: string;
}

export interface Verification {
  verified: boolean;
  /** Every difference found, as one sentence; null when verified. */
  mismatch: string | null;
}

/**
 * Exact comparison (no tolerance): the study is deterministic per trial and merged chunking-independently,
 * so an honest client computing the same study gets identical numbers. Compared: trials, seed, error model
 * (canonical JSON), pass count, failures per band (ids in mask order and counts), yield, Wilson low and high.
 */
export function verifyClientResult(
  server: YieldResult,
  client: ComparableResult,
  run: { trials: number; seed: string; errorModel: ErrorModel },
): Verification {
  const reasons: string[] = [];
  if (client.trials !== run.trials) reasons.push(`trials: client ${client.trials}, run ${run.trials}`);
  if (client.seed !== run.seed)
    reasons.push(`seed: client ${JSON.stringify(client.seed)}, run ${JSON.stringify(run.seed)}`);
  if (canonicalJson(client.errorModel) !== canonicalJson(run.errorModel))
    reasons.push("error model differs from the run's");
  if (client.passCount !== server.passCount)
    reasons.push(`pass count: client ${client.passCount}, server ${server.passCount}`);
  const serverBands = server.bandFailures;
  if (
    client.bandFailures.length !== serverBands.length ||
    client.bandFailures.some((b, i) => b.id !== serverBands[i]?.id)
  ) {
    reasons.push(
      `bands: client [${client.bandFailures.map((b) => b.id).join(", ")}], server [${serverBands.map((b) => b.id).join(", ")}]`,
    );
  } else {
    client.bandFailures.forEach((b, i) => {
      const s = serverBands[i];
      if (s && s.count !== b.count)
        reasons.push(`failures in band ${b.id}: client ${b.count}, server ${s.count}`);
    });
  }
  if (client.yield !== server.yield) reasons.push(`yield: client ${client.yield}, server ${server.yield}`);
  if (client.interval.low !== server.interval.low || client.interval.high !== server.interval.high) {
    reasons.push(
      `interval: client [${client.interval.low}, ${client.interval.high}], server [${server.interval.low}, ${server.interval.high}]`,
    );
  }
  if (reasons.length > 0 && client.engineVersion && client.engineVersion !== server.engineVersion) {
    reasons.push(`engine version: client ${client.engineVersion}, server ${server.engineVersion}`);
  }
  return reasons.length === 0
    ? { verified: true, mismatch: null }
    : { verified: false, mismatch: reasons.join("; ") };
}
