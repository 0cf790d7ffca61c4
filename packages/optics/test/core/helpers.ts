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
  /** principal square root (Re ≥ 0) */
  sqrt(): Cx {
    const r = Math.hypot(this.re, this.im);
    const a = Math.sqrt((r + this.re) / 2);
    const b = Math.sqrt(Math.max(0, (r - this.re) / 2));
    return new Cx(a, this.im < 0 ? -b : b);
  }
  exp(): Cx {
    const e = Math.exp(this.re);
    return new Cx(e * Math.cos(this.im), e * Math.sin(this.im));
  }
  neg(): Cx {
    return new Cx(-this.re, -this.im);
  }
}
