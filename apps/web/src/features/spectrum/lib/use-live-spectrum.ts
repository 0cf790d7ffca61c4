import { useMemo } from "react";
import { createSpecEvaluator } from "@stackproof/optics";
import type { Design, SpecEvaluator, SpecMask, BandOutcome, WorstPoint } from "@stackproof/optics";
import { createSpectrumEngine, structureKey, thicknessesOf } from "./spectrum-engine.ts";
import type { Spectrum, SpectrumEngine, SpectrumSettings } from "./spectrum-engine.ts";

// Compiled evaluators, keyed by stack structure: a thickness edit reuses them.
const engines = new Map<string, SpectrumEngine>();
const verdictEngines = new Map<string, SpecEvaluator>();
const CACHE = 8;

function remember<T>(map: Map<string, T>, key: string, make: () => T): T {
  const hit = map.get(key);
  if (hit) {
    map.delete(key);
    map.set(key, hit);
    return hit;
  }
  const made = make();
  map.set(key, made);
  if (map.size > CACHE) {
    const oldest = map.keys().next().value;
    if (oldest !== undefined) map.delete(oldest);
  }
  return made;
}

export type SpectrumState = { ok: true; spectrum: Spectrum } | { ok: false; error: string };

/** The design's spectrum under the chart settings; recomputed on every change of the design. */
export function computeLiveSpectrum(design: Design, settings: SpectrumSettings): SpectrumState {
  try {
    const engine = remember(engines, structureKey(design, settings), () =>
      createSpectrumEngine(design, settings),
    );
    return { ok: true, spectrum: engine.compute(thicknessesOf(design)) };
  } catch (e) {
    return { ok: false, error: e instanceof Error ? e.message : String(e) };
  }
}

export function useLiveSpectrum(design: Design, settings: SpectrumSettings): SpectrumState {
  return useMemo(() => computeLiveSpectrum(design, settings), [design, settings]);
}

/**
 * Band outcomes and, per band, its violation points — both from ONE evaluation (the chips and the chart's
 * violation marks can never disagree).
 */
export type VerdictState =
  | { ok: true; bands: BandOutcome[]; pass: boolean; violations: Map<string, WorstPoint[]> }
  | { ok: false; error: string };

/**
 * Outcomes of the design against the mask, each band at its own angle and polarization, then each colour
 * requirement (outcomes with `colour`: the colour found, from the same evaluation).
 */
export function computeVerdicts(design: Design, mask: SpecMask | null): VerdictState | null {
  if (!mask || mask.bands.length + (mask.colour?.length ?? 0) === 0) return null;
  try {
    const key = JSON.stringify([
      design.layers.map((l) => l.material),
      design.incident,
      design.exit,
      design.substrate,
      design.materials ?? null,
      mask,
    ]);
    const ev = remember(verdictEngines, key, () => createSpecEvaluator(design, mask));
    const bands = ev.evaluate(thicknessesOf(design));
    const violations = new Map(bands.map((b, i) => [b.id, ev.violations(i)] as const));
    return { ok: true, bands, pass: bands.every((b) => b.pass), violations };
  } catch (e) {
    return { ok: false, error: e instanceof Error ? e.message : String(e) };
  }
}

export function useVerdicts(design: Design, mask: SpecMask | null): VerdictState | null {
  return useMemo(() => computeVerdicts(design, mask), [design, mask]);
}
