// Test helpers for the core engine: relative-tolerance comparison and small design builders.
import { expect } from "vitest";
import { parseDesign, type Design, type Material } from "../../src/core/index.ts";

/**
 * Assert |actual − expected| ≤ rel·|expected| + abs. The absolute floor keeps comparisons near
 * zero meaningful (a relative tolerance alone fails for expected = 0).
 */
export function expectClose(actual: number, expected: number, rel = 1e-9, abs = 1e-12): void {
  const tol = rel * Math.abs(expected) + abs;
  if (!(Math.abs(actual - expected) <= tol)) {
    expect.fail(`expected ${actual} to be within ${tol.toExponential(2)} of ${expected} (rel ${rel}, abs ${abs})`);
  }
}

/** Element-wise {@link expectClose} over two arrays. */
export function expectAllClose(actual: ArrayLike<number>, expected: ArrayLike<number>, rel = 1e-9, abs = 1e-12): void {
  expect(actual.length).toBe(expected.length);
  for (let i = 0; i < actual.length; i++) {
    const a = actual[i] as number;
    const e = expected[i] as number;
    const tol = rel * Math.abs(e) + abs;
    if (!(Math.abs(a - e) <= tol)) expect.fail(`at index ${i}: ${a} vs ${e} (tolerance ${tol.toExponential(2)})`);
  }
}

/** A constant-index material N = n − ik. */
export function constant(id: string, n: number, k = 0): Material {
  return { id, name: id, model: { kind: "constant", n, k }, role: k > 0 ? "metal" : "layer", source: "test value" };
}

export interface TestStack {
  /** layers in deposition order: [n, k, thickness nm] */
  layers?: [number, number, number][];
  incident?: [number, number];
  substrate?: [number, number];
  exit?: [number, number];
  backside?: boolean;
  thicknessMm?: number;
}

/** Build a design from constant indices (materials named by position). */
export function stack(spec: TestStack): Design {
  const mats: Material[] = [];
  const layers = (spec.layers ?? []).map(([n, k, t], i) => {
    mats.push(constant(`m${i}`, n, k));
    return { material: `m${i}`, thickness: t };
  });
  const inc = spec.incident ?? [1, 0];
  const sub = spec.substrate ?? [1.52, 0];
  const ex = spec.exit ?? [1, 0];
  mats.push(constant("inc", inc[0], inc[1]), constant("sub", sub[0], sub[1]), constant("exit", ex[0], ex[1]));
  return parseDesign({
    format: "stackproof.design/v1",
    name: "test stack",
    referenceWavelength: 550,
    incident: "inc",
    layers,
    substrate: { material: "sub", thicknessMm: spec.thicknessMm ?? 1, backside: spec.backside ?? false },
    exit: "exit",
    materials: mats,
  });
}

/** Minimal complex arithmetic for independent reference formulas in tests. */
export class Cx {
  constructor(
    readonly re: number,
    readonly im: number,
  ) {}
  static of(re: number, im = 0): Cx {
    return new Cx(re, im);
  }
  add(o: Cx): Cx {
    return new Cx(this.re + o.re, this.im + o.im);
  }
  sub(o: Cx): Cx {
    return new Cx(this.re - o.re, this.im - o.im);
  }
  mul(o: Cx): Cx {
    return new Cx(this.re * o.re - this.im * o.im, this.re * o.im + this.im * o.re);
  }
  div(o: Cx): Cx {
    const d = o.re * o.re + o.im * o.im;
    return new Cx((this.re * o.re + this.im * o.im) / d, (this.im * o.re - this.re * o.im) / d);
  }
  abs2(): number {
    return this.re * this.re + this.im * this.im;
  }
  /** principal square root (Re ≥ 0), in the cancellation-free form */
  sqrt(): Cx {
    const r = Math.hypot(this.re, this.im);
    if (r === 0) return new Cx(0, 0);
    if (this.re >= 0) {
      const a = Math.sqrt((r + this.re) / 2);
      return new Cx(a, this.im / (2 * a));
    }
    const b = Math.sqrt((r - this.re) / 2) * (this.im < 0 ? -1 : 1);
    return new Cx(this.im / (2 * b), b);
  }
  exp(): Cx {
    const e = Math.exp(this.re);
    return new Cx(e * Math.cos(this.im), e * Math.sin(this.im));
  }
  neg(): Cx {
    return new Cx(-this.re, -this.im);
  }
}

/**
 * Straightforward characteristic-matrix computation with object complex numbers, written
 * independently of the engine's kernel (Macleod, Thin-Film Optical Filters): layers in
 * deposition order, N = n − ik, forward branch Im q ≤ 0, incoherent back surface when asked.
 */
export function referenceRT(
  spec: Required<Pick<TestStack, "layers">> & TestStack,
  lambda: number,
  angleDeg: number,
  pol: "s" | "p",
): { R: number; T: number } {
  const n0 = (spec.incident ?? [1, 0])[0];
  const sub = spec.substrate ?? [1.52, 0];
  const ne = (spec.exit ?? [1, 0])[0];
  const s = n0 * Math.sin((angleDeg * Math.PI) / 180);
  const q = (N: Cx): Cx => {
    let r = N.mul(N).sub(Cx.of(s * s)).sqrt();
    if (r.im > 0 || (r.im === 0 && r.re < 0)) r = r.neg();
    return r;
  };
  const eta = (N: Cx): Cx => (pol === "s" ? q(N) : N.mul(N).div(q(N)));
  const layerM = (N: Cx, d: number): [Cx, Cx, Cx, Cx] => {
    const delta = q(N).mul(Cx.of((2 * Math.PI * d) / lambda));
    const ep = delta.mul(Cx.of(0, 1)).exp();
    const em = delta.mul(Cx.of(0, -1)).exp();
    const cos = ep.add(em).mul(Cx.of(0.5));
    const sin = ep.sub(em).div(Cx.of(0, 2));
    const e = eta(N);
    const i = Cx.of(0, 1);
    return [cos, i.mul(sin).div(e), i.mul(e).mul(sin), cos];
  };
  const mul = (A: [Cx, Cx, Cx, Cx], B: [Cx, Cx, Cx, Cx]): [Cx, Cx, Cx, Cx] => [
    A[0].mul(B[0]).add(A[1].mul(B[2])),
    A[0].mul(B[1]).add(A[1].mul(B[3])),
    A[2].mul(B[0]).add(A[3].mul(B[2])),
    A[2].mul(B[1]).add(A[3].mul(B[3])),
  ];
  const product = (order: [number, number, number][]): [Cx, Cx, Cx, Cx] => {
    let M: [Cx, Cx, Cx, Cx] = [Cx.of(1), Cx.of(0), Cx.of(0), Cx.of(1)];
    for (const [n, k, d] of order) M = mul(M, layerM(Cx.of(n, -k), d));
    return M;
  };
  const fromIncident = [...spec.layers].reverse();
  const Ns = Cx.of(sub[0], -sub[1]);
  const e0 = eta(Cx.of(n0));
  const es = eta(Ns);
  const respond = (M: [Cx, Cx, Cx, Cx], ein: Cx, eout: Cx) => {
    const B = M[0].add(M[1].mul(eout));
    const C = M[2].add(M[3].mul(eout));
    const den = ein.mul(B).add(C);
    return {
      R: ein.mul(B).sub(C).div(den).abs2(),
      T: (4 * ein.re * eout.re) / den.abs2(),
    };
  };
  const front = respond(product(fromIncident), e0, es);
  if (!spec.backside) return front;
  const back = respond(product(spec.layers), es, e0); // seen from inside the substrate
  const ee = eta(Cx.of(ne));
  const Rb = es.sub(ee).div(es.add(ee)).abs2();
  const Tb = (4 * es.re * ee.re) / es.add(ee).abs2();
  const dNm = (spec.thicknessMm ?? 1) * 1e6;
  const tau = Math.exp((4 * Math.PI * q(Ns).im * dNm) / lambda);
  const den = 1 - back.R * Rb * tau * tau;
  return { R: front.R + (front.T * front.T * tau * tau * Rb) / den, T: (front.T * tau * Tb) / den };
}
