// Colour of the light the design reflects and transmits (CIE x, y and L*a*b*), with a swatch. All colour
// science is the optics package's (colourOfDesign, colourSwatch); this only lays it out.
import { useDeferredValue, useId, useMemo, useState } from "react";
import {
  colourOfDesign,
  colourSwatch,
  type Design,
  type Illuminant,
  type Observer,
} from "@stackproof/optics";

type Pol = "s" | "p" | "u";

function compute(
  design: Design,
  angleDeg: number,
  polarization: Pol,
  illuminant: Illuminant,
  observer: Observer,
) {
  try {
    const opts = { angleDeg, polarization, illuminant, observer };
    const R = colourOfDesign(design, { ...opts, quantity: "R" });
    const T = colourOfDesign(design, { ...opts, quantity: "T" });
    return {
      ok: true as const,
      rows: [
        { label: "Reflected", c: R },
        { label: "Transmitted", c: T },
      ],
      warnings: R.warnings,
    };
  } catch (e) {
    return { ok: false as const, error: e instanceof Error ? e.message : String(e) };
  }
}

const select = "rounded border border-ink-300 bg-white px-1.5 py-0.5 text-xs";

export function ColourReadout({
  design,
  angleDeg,
  polarization,
}: {
  design: Design;
  angleDeg: number;
  polarization: Pol;
}) {
  const id = useId();
  const [illuminant, setIlluminant] = useState<Illuminant>("D65");
  const [observer, setObserver] = useState<Observer>("2");
  const deferred = useDeferredValue(design);
  const result = useMemo(
    () => compute(deferred, angleDeg, polarization, illuminant, observer),
    [deferred, angleDeg, polarization, illuminant, observer],
  );
  return (
    <section
      aria-labelledby={`${id}-h`}
      className="mt-2 rounded-md border border-ink-100 p-2 text-xs text-ink-700"
    >
      <div className="flex flex-wrap items-center gap-2">
        <h3 id={`${id}-h`} className="font-semibold text-ink-800">
          Colour at {angleDeg}°, {polarization === "u" ? "unpolarized" : `${polarization}-polarized`}
        </h3>
        <label className="ml-auto flex items-center gap-1">
          Illuminant
          <select
            className={select}
            value={illuminant}
            onChange={(e) => setIlluminant(e.target.value as Illuminant)}
          >
            <option value="D65">D65</option>
            <option value="A">A</option>
          </select>
        </label>
        <label className="flex items-center gap-1">
          Observer
          <select
            className={select}
            value={observer}
            onChange={(e) => setObserver(e.target.value as Observer)}
          >
            <option value="2">CIE 1931 2°</option>
            <option value="10">CIE 1964 10°</option>
          </select>
        </label>
      </div>
      {result.ok ? (
        <table className="mt-1 w-full text-left tabular">
          <caption className="sr-only">
            Chromaticity and CIELAB of reflected and transmitted light, 380–780 nm
          </caption>
          <thead>
            <tr className="text-ink-500">
              <th scope="col" className="py-0.5 font-medium">
                Light
              </th>
              <th scope="col" className="font-medium">
                Swatch
              </th>
              <th scope="col" className="font-medium">
                Y %
              </th>
              <th scope="col" className="font-medium">
                x, y
              </th>
              <th scope="col" className="font-medium">
                L*, a*, b*
              </th>
            </tr>
          </thead>
          <tbody>
            {result.rows.map(({ label, c }) => {
              const sw = colourSwatch(c, true);
              return (
                <tr key={label} data-colour={label}>
                  <th scope="row" className="py-0.5 font-medium">
                    {label}
                  </th>
                  <td>
                    <span
                      className="inline-block h-4 w-8 rounded border border-ink-300 align-middle"
                      style={{ backgroundColor: sw.hex }}
                      title={`${sw.hex}, hue at full brightness${sw.inGamut ? "" : " (outside sRGB, clipped)"}`}
                    />
                  </td>
                  <td className="font-mono">{c.Y.toFixed(2)}</td>
                  <td className="font-mono">
                    {c.x.toFixed(4)}, {c.y.toFixed(4)}
                  </td>
                  <td className="font-mono">
                    {c.L.toFixed(2)}, {c.a.toFixed(2)}, {c.b.toFixed(2)}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      ) : (
        <p className="mt-1 text-verdict-warn" role="status">
          No colour: {result.error}
        </p>
      )}
    </section>
  );
}
