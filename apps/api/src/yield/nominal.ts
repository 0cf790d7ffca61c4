// Nominal verdicts computed on the worker pool, so that a heavy revision never holds the request thread.
import type { SpecResult } from "@stackproof/optics";
import type { AppContext } from "../context.ts";
import { maskOf, stackOf, type RevisionContext } from "../domain/load.ts";

/** The revision's nominal spec result against its mask, computed off the request thread. */
export function nominalFor(ctx: Pick<AppContext, "compute">, rc: RevisionContext): Promise<SpecResult> {
  return ctx.compute.evaluateSpec(stackOf(rc.revision), maskOf(rc.revision, rc.program));
}
