import { formatPercent, formatTarget } from "../../../lib/format.ts";
import type { YieldEstimate } from "@stackproof/contracts";
import { cx } from "../../../components/ui/cx.ts";

export interface YieldVersusTargetProps {
  estimate: YieldEstimate | null;
  target: number;
  className?: string;
}

/** "96.4 % (94.1–97.9) / target 95 %", green at or above the target, red below (the approval rule). */
export function YieldVersusTarget({ estimate, target, className }: YieldVersusTargetProps) {
  if (!estimate) {
    return (
      <span className={cx("text-sm text-ink-500", className)}>
        No verified run <span className="font-mono text-xs">/ target {formatTarget(target)}</span>
      </span>
    );
  }
  const pass = estimate.yield >= target;
  const straddles = pass && estimate.low < target;
  return (
    <span
      className={cx("inline-flex flex-wrap items-baseline gap-x-1.5 font-mono text-sm tabular xl:flex-nowrap xl:whitespace-nowrap", className)}
      title={straddles ? "At the target, but the lower end of the interval is below it." : undefined}
    >
      <span className={cx("font-semibold", pass ? "text-verdict-pass" : "text-verdict-fail")}>
        <span className="whitespace-nowrap">
          <span
            aria-hidden
            className={cx(
              "mr-1.5 inline-block h-2 w-2 rounded-full",
              pass ? "bg-verdict-pass" : "bg-verdict-fail",
            )}
          />
          {formatPercent(estimate.yield)}
        </span>{" "}
        <span className="whitespace-nowrap">
          ({(estimate.low * 100).toFixed(1)}–{(estimate.high * 100).toFixed(1)})
        </span>
      </span>
      <span className="text-xs whitespace-nowrap text-ink-500">/ target {formatTarget(target)}</span>
      <span className="sr-only">{pass ? "meets the target" : "below the target"}</span>
    </span>
  );
}
