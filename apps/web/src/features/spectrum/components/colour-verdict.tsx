// One colour requirement's verdict beside the chart: swatch, the colour found, margin and pass/fail. Every number is
// the optics package's (the spec evaluator's own outcome); this only lays it out.
import { colourConditionsText, type BandOutcome, type SpecColour } from "@stackproof/optics";

const f4 = (v: number) => (Number.isFinite(v) ? v.toFixed(4) : "—");
const f2 = (v: number) => (Number.isFinite(v) ? v.toFixed(2) : "—");

/** The colour found, in the coordinates its requirement is written in. */
export function colourCoordinatesText(outcome: BandOutcome, requirement: SpecColour | undefined): string {
  const c = outcome.colour;
  if (!c) return "";
  const type = requirement?.limit.type ?? "box-ab";
  if (type === "box-xy") return `x ${f4(c.x)}, y ${f4(c.y)}`;
  const lab = `L* ${f2(c.L)}, a* ${f2(c.a)}, b* ${f2(c.b)}`;
  return type === "delta-e" && c.deltaE !== undefined ? `${lab}, ΔE ${f2(c.deltaE)}` : lab;
}

function marginText(outcome: BandOutcome, requirement: SpecColour | undefined): string {
  if (!Number.isFinite(outcome.margin)) return "";
  const type = requirement?.limit.type ?? "box-ab";
  const sign = outcome.margin >= 0 ? "+" : "";
  if (type === "box-xy")
    return `margin ${sign}${outcome.margin.toFixed(4)} in ${outcome.colour?.limiting ?? "x"}`;
  if (type === "delta-e") return `margin ${sign}${outcome.margin.toFixed(2)} ΔE`;
  return `margin ${sign}${outcome.margin.toFixed(2)} in ${outcome.colour?.limiting ?? "a"}*`;
}

export function ColourVerdict({
  outcome,
  requirement,
}: {
  outcome: BandOutcome;
  requirement: SpecColour | undefined;
}) {
  const c = outcome.colour;
  const name = requirement?.label ?? outcome.id;
  return (
    <>
      <span
        className={`rounded px-1.5 py-0.5 font-semibold ${outcome.pass ? "bg-verdict-pass/10 text-verdict-pass" : "bg-verdict-fail/10 text-verdict-fail"}`}
      >
        {outcome.pass ? "pass" : "fail"}
      </span>
      <span
        className="inline-block h-3.5 w-6 shrink-0 rounded border border-ink-300"
        style={{ backgroundColor: c?.swatch ?? "transparent" }}
        role="img"
        aria-label={`Swatch of ${name}: ${c?.swatch ?? "none"} (hue at full brightness)`}
      />
      <span className="truncate">{name}</span>
      <span
        className="ml-auto tabular text-ink-500"
        title="Colour found by the spec evaluation (CIE 015, 380–780 nm)"
      >
        {outcome.reason && !Number.isFinite(outcome.margin)
          ? outcome.reason
          : colourCoordinatesText(outcome, requirement)}
        {marginText(outcome, requirement) ? ` · ${marginText(outcome, requirement)}` : ""}
        {requirement ? ` · ${colourConditionsText(requirement)}` : ""}
      </span>
    </>
  );
}
