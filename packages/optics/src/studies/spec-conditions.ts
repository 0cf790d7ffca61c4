/**
 * Evaluation of one spec band under its conditions: an angle range (every angle must pass), an average over
 * an angle range, a cone of light, and "s and p each". Internal to spec.ts (which owns the band schema).
 *
 * Structure that keeps it cheap across Monte Carlo trials: every angle node is a kernel whose refraction
 * terms (q = N cos θ, admittances, per layer and wavelength) are tabulated once, at compile time, and reused
 * by every trial; the cone's azimuth is integrated without any optics (see coneRule), so a cone costs one
 * kernel pair per polar node, not per ray; the worst-angle search refills two probe kernels in place.
 */
import {
  adaptiveRule,
  angleRangeRule,
  averageRule,
  coneHalfAngleDeg,
  coneRule,
  ANGLE_RULE_TOLERANCE,
} from "../core/spectrum.ts";
import type { AngleRule, RuleResponses } from "../core/spectrum.ts";
import { PolKernel, prepareStack, tabulate } from "../core/kernel.ts";
import type { PreparedStack } from "../core/kernel.ts";
import type { Design } from "../core/design.ts";
import type { BandPolarization, GroupPlan, Polarization, SpecBand } from "./spec.ts";

/** Polarization codes of GroupPlan.polAt. */
export const POL_CODES: readonly Polarization[] = ["s", "p", "u"];

/** Sampled angles of a band's angle range (degrees): evenly spaced, both ends included, step ≤ stepDeg. */
export function bandAngles(
  range: { fromDeg: number; toDeg: number; stepDeg?: number | undefined },
  defaultStep = 1,
): Float64Array {
  const { fromDeg, toDeg } = range;
  if (toDeg === fromDeg) return Float64Array.of(fromDeg);
  const step = range.stepDeg ?? defaultStep;
  const n = Math.ceil((toDeg - fromDeg) / step - 1e-9) + 1;
  const out = new Float64Array(n);
  for (let k = 0; k < n; k++) out[k] = k === n - 1 ? toDeg : fromDeg + ((toDeg - fromDeg) * k) / (n - 1);
  return out;
}

const fmt = (x: number): string => String(Math.round(x * 100) / 100);
const polWords: Record<BandPolarization, string> = {
  s: "s-polarized",
  p: "p-polarized",
  u: "unpolarized",
  sp: "s and p each",
};

/** One angle and polarization in words, e.g. "12°, s-polarized". */
export function conditionsText(angleDeg: number, polarization: BandPolarization): string {
  return `${fmt(angleDeg)}°, ${polWords[polarization]}`;
}

const observerWords = { "2": "CIE 1931 2°", "10": "CIE 1964 10°" } as const;

/** The conditions of a colour requirement in words, e.g. "reflected, D65, CIE 1931 2°, 0°, unpolarized". */
export function colourConditionsText(c: {
  quantity: "R" | "T";
  illuminant: "D65" | "A";
  observer: "2" | "10";
  angleDeg: number;
  polarization: Polarization;
}): string {
  return `${c.quantity === "R" ? "reflected" : "transmitted"}, ${c.illuminant}, ${observerWords[c.observer]}, ${conditionsText(c.angleDeg, c.polarization)}`;
}

/** The conditions of a band in words, e.g. "0–10°, s and p each" or "f/2 cone (14.48° half-angle) about 0°, unpolarized". */
export function bandConditionsText(band: SpecBand): string {
  let where: string;
  if (band.angleRange) {
    const r = band.angleRange;
    where =
      r.fromDeg === r.toDeg
        ? `${fmt(r.fromDeg)}°`
        : band.angleAverage
          ? `averaged over ${fmt(r.fromDeg)}–${fmt(r.toDeg)}°`
          : `${fmt(r.fromDeg)}–${fmt(r.toDeg)}°`;
  } else if (band.cone) {
    const half = coneHalfAngleDeg(band.cone);
    const f =
      "fNumber" in band.cone
        ? `f/${fmt(band.cone.fNumber)} cone (${fmt(half)}° half-angle)`
        : `${fmt(half)}° half-angle cone`;
    where = `${f} about ${fmt(band.angleDeg)}°`;
  } else {
    where = `${fmt(band.angleDeg)}°`;
  }
  return `${where}, ${polWords[band.polarization]}`;
}

/** Does a band need its own evaluation (angle range, cone or "s and p each")? */
export function isComplexBand(band: SpecBand): boolean {
  return band.angleRange !== undefined || band.cone !== undefined || band.polarization === "sp";
}

interface NodeBuffers {
  sR: Float64Array;
  sT: Float64Array;
  sA: Float64Array;
  pR: Float64Array;
  pT: Float64Array;
  pA: Float64Array;
}

const buffers = (W: number): NodeBuffers => ({
  sR: new Float64Array(W),
  sT: new Float64Array(W),
  sA: new Float64Array(W),
  pR: new Float64Array(W),
  pT: new Float64Array(W),
  pA: new Float64Array(W),
});

/** Value of the band's quantity from R, T, A fractions (band units). */
export type ValueOf = (R: number, T: number, A: number) => number;

/**
 * One band with conditions, compiled against a design over the band's sample wavelengths. `group` holds the
 * band's curve after {@link ComplexBand.compute}.
 */
export class ComplexBand {
  readonly group: GroupPlan;
  readonly warnings: string[];
  /** the rule of an averaged band (cone or angle average), for reporting */
  readonly rule: AngleRule | undefined;
  private readonly prep: PreparedStack;
  private readonly W: number;
  private readonly kind: "range" | "average";
  /** channels: 0 = s, 1 = p, 2 = unpolarized (for averages: s-beam, p-beam, unpolarized) */
  private readonly channels: number[];
  private readonly wantLow: boolean;
  private readonly avgReq: boolean;
  private readonly value: ValueOf;
  // nodes: sampled angles (range) or rule nodes (average)
  private readonly angles: Float64Array;
  private readonly kS: (PolKernel | undefined)[];
  private readonly kP: (PolKernel | undefined)[];
  private readonly node: NodeBuffers[];
  private readonly avg: NodeBuffers;
  private readonly ruleResp: RuleResponses | undefined;
  // worst-angle probes (range only)
  private probeS: PolKernel | undefined;
  private probeP: PolKernel | undefined;
  private readonly probe: NodeBuffers;
  private readonly nodeBad: Float64Array;
  private readonly range: { from: number; to: number } | undefined;
  private readonly toleranceDeg: number;

  constructor(
    design: Design,
    band: SpecBand,
    wavelengths: readonly number[],
    value: ValueOf,
    nominal: Float64Array | undefined,
    options: { defaultStepDeg: number; toleranceDeg: number; conditions: string },
  ) {
    this.prep = prepareStack(design, wavelengths);
    this.warnings = this.prep.warnings;
    const W = this.prep.W;
    this.W = W;
    this.value = value;
    this.toleranceDeg = options.toleranceDeg;
    this.wantLow = band.requirement === "min" || band.requirement === "avgMin";
    this.avgReq = band.requirement === "avgMin" || band.requirement === "avgMax";
    const pol = band.polarization;
    this.channels = pol === "s" ? [0] : pol === "p" ? [1] : pol === "u" ? [2] : [0, 1];
    const averaged = band.cone !== undefined || (band.angleRange !== undefined && band.angleAverage === true);
    this.kind = averaged ? "average" : "range";
    const d = nominal ?? this.prep.nominal;
    const needS = pol !== "p" || averaged; // cones mix s and p on tilted rays
    const needP = pol !== "s" || averaged;
    this.kS = [];
    this.kP = [];
    this.node = [];
    this.probe = buffers(W);
    if (this.kind === "average") {
      type Node = { s: PolKernel; p: PolKernel; b: NodeBuffers };
      const byRule = new Map<AngleRule, Node[]>();
      const build = (K: number): AngleRule => {
        if (band.cone) return coneRule(band.angleDeg, coneHalfAngleDeg(band.cone), K);
        const r = band.angleRange!;
        return angleRangeRule(r.fromDeg, r.toDeg, K);
      };
      const evaluate = (rule: AngleRule): Float64Array => {
        const kernels = Array.from(rule.anglesDeg, (a) => {
          const b = buffers(W);
          const s = new PolKernel(tabulate(this.prep, a, "s"));
          const p = new PolKernel(tabulate(this.prep, a, "p"));
          s.run(d, undefined, b.sR, b.sT, b.sA);
          p.run(d, undefined, b.pR, b.pT, b.pA);
          return { s, p, b };
        });
        byRule.set(rule, kernels);
        const out = buffers(W);
        averageRule(
          this.responses(
            rule,
            kernels.map((k) => k.b),
          ),
          W,
          out,
        );
        const v = new Float64Array(4 * W);
        v.set(out.sR, 0);
        v.set(out.sT, W);
        v.set(out.pR, 2 * W);
        v.set(out.pT, 3 * W);
        return v;
      };
      const single = band.angleRange && band.angleRange.fromDeg === band.angleRange.toDeg;
      const rule = single ? build(1) : adaptiveRule(build, evaluate, ANGLE_RULE_TOLERANCE);
      if (single) evaluate(rule);
      this.rule = rule;
      this.angles = rule.anglesDeg;
      for (const k of byRule.get(rule) ?? []) {
        this.kS.push(k.s);
        this.kP.push(k.p);
        this.node.push(k.b);
      }
      this.ruleResp = this.responses(rule, this.node);
      this.range = undefined;
    } else {
      this.rule = undefined;
      this.ruleResp = undefined;
      const r = band.angleRange ?? { fromDeg: band.angleDeg, toDeg: band.angleDeg };
      this.angles = bandAngles(r, options.defaultStepDeg);
      for (const a of this.angles) {
        // at normal incidence s and p coincide: one kernel serves both
        this.kS.push(needS || a === 0 ? new PolKernel(tabulate(this.prep, a, "s")) : undefined);
        this.kP.push(needP && a !== 0 ? new PolKernel(tabulate(this.prep, a, "p")) : undefined);
        this.node.push(buffers(W));
      }
      this.range = r.toDeg > r.fromDeg ? { from: r.fromDeg, to: r.toDeg } : undefined;
      if (this.range) {
        const mid = (r.fromDeg + r.toDeg) / 2;
        this.probeS = needS ? new PolKernel(tabulate(this.prep, mid, "s")) : undefined;
        this.probeP = needP ? new PolKernel(tabulate(this.prep, mid, "p")) : undefined;
      }
    }
    this.avg = buffers(W);
    this.nodeBad = new Float64Array(this.angles.length);
    this.group = {
      angleDeg: band.angleRange ? band.angleRange.fromDeg : band.angleDeg,
      polarization: pol,
      wavelengths: this.prep.wavelengths,
      R: new Float64Array(W),
      T: new Float64Array(W),
      A: new Float64Array(W),
      angleAt: new Float64Array(W),
      polAt: new Uint8Array(W),
      conditions: options.conditions,
    };
  }

  private responses(rule: AngleRule, b: NodeBuffers[]): RuleResponses {
    return {
      rule,
      sR: b.map((x) => x.sR),
      sT: b.map((x) => x.sT),
      sA: b.map((x) => x.sA),
      pR: b.map((x) => x.pR),
      pT: b.map((x) => x.pT),
      pA: b.map((x) => x.pA),
    };
  }

  /** Is a worse than b for this band (lower for min bands, higher for max bands; NaN is worst)? */
  private worse(a: number, b: number): boolean {
    if (Number.isNaN(a)) return !Number.isNaN(b);
    if (Number.isNaN(b)) return false;
    return this.wantLow ? a < b : a > b;
  }

  private runAt(
    kS: PolKernel | undefined,
    kP: PolKernel | undefined,
    b: NodeBuffers,
    d: Float64Array,
    scale: Float64Array | undefined,
  ): void {
    if (kS) kS.run(d, scale, b.sR, b.sT, b.sA);
    if (kP) kP.run(d, scale, b.pR, b.pT, b.pA);
    else if (kS) {
      b.pR.set(b.sR);
      b.pT.set(b.sT);
      b.pA.set(b.sA);
    }
    if (!kS && kP) {
      b.sR.set(b.pR);
      b.sT.set(b.pT);
      b.sA.set(b.pA);
    }
  }

  /** Channel c's R, T, A at wavelength w of buffers b (c: 0 s, 1 p, 2 mean). */
  private chanValue(b: NodeBuffers, c: number, w: number): number {
    if (c === 0) return this.value(b.sR[w]!, b.sT[w]!, b.sA[w]!);
    if (c === 1) return this.value(b.pR[w]!, b.pT[w]!, b.pA[w]!);
    return this.value(0.5 * (b.sR[w]! + b.pR[w]!), 0.5 * (b.sT[w]! + b.pT[w]!), 0.5 * (b.sA[w]! + b.pA[w]!));
  }

  private put(b: NodeBuffers, c: number, w: number, angle: number): void {
    const g = this.group;
    if (c === 0) {
      g.R[w] = b.sR[w]!;
      g.T[w] = b.sT[w]!;
      g.A[w] = b.sA[w]!;
    } else if (c === 1) {
      g.R[w] = b.pR[w]!;
      g.T[w] = b.pT[w]!;
      g.A[w] = b.pA[w]!;
    } else {
      g.R[w] = 0.5 * (b.sR[w]! + b.pR[w]!);
      g.T[w] = 0.5 * (b.sT[w]! + b.pT[w]!);
      g.A[w] = 0.5 * (b.sA[w]! + b.pA[w]!);
    }
    g.angleAt![w] = angle;
    g.polAt![w] = c;
  }

  /**
   * Merge one node (buffers b at `angle`) into the band's curve; `first` replaces it. Returns the node's
   * badness: its worst value (min/max requirements) or worst channel mean (average requirements).
   */
  private merge(b: NodeBuffers, angle: number, first: boolean): number {
    const W = this.W;
    const g = this.group;
    let bad = Number.NaN;
    let badSet = false;
    if (!this.avgReq) {
      for (let w = 0; w < W; w++) {
        for (const c of this.channels) {
          const v = this.chanValue(b, c, w);
          if (!badSet || this.worse(v, bad)) {
            bad = v;
            badSet = true;
          }
          if (first && c === this.channels[0]) this.put(b, c, w, angle);
          else if (this.worse(v, this.value(g.R[w]!, g.T[w]!, g.A[w]!))) this.put(b, c, w, angle);
        }
      }
      return bad;
    }
    // average requirement: the worst whole curve decides
    let cur = Number.NaN;
    if (!first) {
      let sum = 0;
      for (let w = 0; w < W; w++) sum += this.value(g.R[w]!, g.T[w]!, g.A[w]!);
      cur = sum / W;
    }
    for (const c of this.channels) {
      let sum = 0;
      for (let w = 0; w < W; w++) sum += this.chanValue(b, c, w);
      const mean = sum / W;
      if (!badSet || this.worse(mean, bad)) {
        bad = mean;
        badSet = true;
      }
      if ((first && c === this.channels[0]) || this.worse(mean, cur)) {
        for (let w = 0; w < W; w++) this.put(b, c, w, angle);
        cur = mean;
        first = false;
      }
    }
    return bad;
  }

  /**
   * Compute the band's curve for thicknesses d (nm) and optional index factors. `refine`: search for the
   * worst angle between samples (angle ranges); `skipRefineIfFailing` lets a caller that only needs the
   * verdict skip the search when a sample already fails (the search can only find worse).
   */
  compute(d: Float64Array, scale: Float64Array | undefined, refine: boolean, limit?: number): void {
    const n = this.angles.length;
    if (this.kind === "average") {
      for (let i = 0; i < n; i++) {
        const b = this.node[i]!;
        this.kS[i]!.run(d, scale, b.sR, b.sT, b.sA);
        this.kP[i]!.run(d, scale, b.pR, b.pT, b.pA);
      }
      averageRule(this.ruleResp!, this.W, this.avg);
      this.merge(this.avg, this.group.angleDeg, true);
      return;
    }
    let worstK = 0;
    for (let k = 0; k < n; k++) {
      const b = this.node[k]!;
      this.runAt(this.kS[k], this.kP[k], b, d, scale);
      const bad = this.merge(b, this.angles[k]!, k === 0);
      this.nodeBad[k] = bad;
      if (k > 0 && this.worse(bad, this.nodeBad[worstK]!)) worstK = k;
    }
    if (!refine || !this.range) return;
    const worstSampled = this.nodeBad[worstK]!;
    if (Number.isNaN(worstSampled)) return;
    if (limit !== undefined && (this.wantLow ? worstSampled < limit : worstSampled > limit)) return;
    // golden-section search for the worst angle in the intervals either side of the worst sample
    let lo = this.angles[worstK > 0 ? worstK - 1 : 0]!;
    let hi = this.angles[worstK < n - 1 ? worstK + 1 : n - 1]!;
    const probe = (angle: number): number => {
      if (this.probeS) tabulate(this.prep, angle, "s", this.probeS.t);
      if (this.probeP) tabulate(this.prep, angle, "p", this.probeP.t);
      this.runAt(this.probeS, this.probeP, this.probe, d, scale);
      const bad = this.merge(this.probe, angle, false);
      // badness as a number to minimise: lower = worse
      return Number.isNaN(bad) ? -Infinity : this.wantLow ? bad : -bad;
    };
    const r = 0.6180339887498949;
    let c = hi - r * (hi - lo);
    let e = lo + r * (hi - lo);
    let fc = probe(c);
    let fe = probe(e);
    while (hi - lo > 2 * this.toleranceDeg) {
      if (fc <= fe) {
        hi = e;
        e = c;
        fe = fc;
        c = hi - r * (hi - lo);
        fc = probe(c);
      } else {
        lo = c;
        c = e;
        fc = fe;
        e = lo + r * (hi - lo);
        fe = probe(e);
      }
    }
  }
}
