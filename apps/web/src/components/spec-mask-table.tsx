import {
  bandConditionsText,
  colourConditionsText,
  describeColourIso,
  type SpecBand,
  type SpecMask,
} from "@stackproof/optics";
import { cx } from "./ui/cx.ts";

const requirementText: Record<SpecBand["requirement"], string> = {
  min: "every point ≥",
  max: "every point ≤",
  avgMin: "band average ≥",
  avgMax: "band average ≤",
};

function unit(q: SpecBand["quantity"]): string {
  return q === "OD" ? "" : " %";
}

/** "every point ≤ 0.5 % (±0.05)" */
export function describeRequirement(b: SpecBand): string {
  const tol = b.tolerance ? ` (tolerance ${b.tolerance}${unit(b.quantity)})` : "";
  return `${requirementText[b.requirement]} ${b.value}${unit(b.quantity)}${tol}`;
}

export interface SpecMaskTableProps {
  mask: SpecMask | null | undefined;
  /** Caption read by screen readers (and shown when `showCaption`). */
  caption?: string;
  showCaption?: boolean;
  className?: string;
}

/**
 * The bands of a spec mask as a table: range, quantity, angle and polarization, requirement; then its colour
 * requirements, if any, in the ISO 9211 style wording of the optics package.
 */
export function SpecMaskTable({
  mask,
  caption = "Spec mask bands",
  showCaption = false,
  className,
}: SpecMaskTableProps) {
  const bands = mask?.bands ?? [];
  const colour = mask?.colour ?? [];
  if (bands.length === 0 && colour.length === 0)
    return <p className="text-sm text-ink-500">The spec mask has no bands.</p>;
  const colourList =
    colour.length > 0 ? (
      <ul className="mt-3 flex flex-col gap-1 text-sm" aria-label={`${caption}: colour requirements`}>
        {colour.map((c) => (
          <li key={c.id} title={colourConditionsText(c)}>
            <span className="font-medium">{c.label ?? c.id}</span>
            {c.label && <span className="ml-1.5 font-mono text-xs text-ink-500">{c.id}</span>}:{" "}
            {describeColourIso(c)}
          </li>
        ))}
      </ul>
    ) : null;
  if (bands.length === 0) return <div className={className}>{colourList}</div>;
  return (
    <div className={cx("overflow-x-auto", className)}>
      <table className="w-full border-collapse text-left text-sm">
        <caption className={showCaption ? "mb-2 text-left text-sm font-semibold" : "sr-only"}>
          {caption}
        </caption>
        <thead>
          <tr className="border-b border-ink-100 text-xs tracking-wide text-ink-500 uppercase">
            <th scope="col" className="py-2 pr-3 font-semibold">
              Band
            </th>
            <th scope="col" className="py-2 pr-3 font-semibold">
              Range (nm)
            </th>
            <th scope="col" className="py-2 pr-3 font-semibold">
              Quantity
            </th>
            <th scope="col" className="py-2 pr-3 font-semibold">
              Incidence
            </th>
            <th scope="col" className="py-2 font-semibold">
              Requirement
            </th>
          </tr>
        </thead>
        <tbody>
          {bands.map((b) => (
            <tr key={b.id} className="border-b border-ink-100 last:border-0">
              <th scope="row" className="py-2 pr-3 font-medium">
                {b.label ?? b.id}
                {b.label && <span className="ml-1.5 font-mono text-xs font-normal text-ink-500">{b.id}</span>}
              </th>
              <td className="py-2 pr-3 font-mono tabular whitespace-nowrap">
                {b.start}–{b.stop}
                {b.step ? <span className="text-ink-500"> / {b.step}</span> : null}
              </td>
              <td className="py-2 pr-3 font-mono">{b.quantity}</td>
              <td className="py-2 pr-3 font-mono whitespace-nowrap">{bandConditionsText(b)}</td>
              <td className="py-2">{describeRequirement(b)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {colourList}
    </div>
  );
}
