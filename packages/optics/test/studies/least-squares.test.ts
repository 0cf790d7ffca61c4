import { describe, expect, it } from "vitest";
import { levenbergMarquardt } from "../../src/studies/least-squares.ts";

describe("levenbergMarquardt", () => {
  // Rosenbrock as least squares r = (10(y − x²), 1 − x): minimum at (1, 1) from the classic start (−1.2, 1)
  // (Moré, Garbow & Hillstrom, ACM TOMS 7:17, 1981, problem 1).
  it("solves the Rosenbrock problem from (−1.2, 1)", () => {
    const res = levenbergMarquardt(
      {
        parameterCount: 2,
        residualCount: 2,
        residuals(x, out) {
          const a = x[0] as number;
          const b = x[1] as number;
          out[0] = 10 * (b - a * a);
          out[1] = 1 - a;
        },
      },
      [-1.2, 1],
      { maxIterations: 200 },
    );
    expect(res.x[0]).toBeCloseTo(1, 5);
    expect(res.x[1]).toBeCloseTo(1, 5);
    expect(res.cost).toBeLessThan(1e-10);
  });

  it("respects bounds: the constrained minimum of (x − 3)² on [0, 2] is x = 2 (by inspection)", () => {
    const res = levenbergMarquardt(
      {
        parameterCount: 1,
        residualCount: 1,
        lower: Float64Array.of(0),
        upper: Float64Array.of(2),
        residuals(x, out) {
          out[0] = (x[0] as number) - 3;
        },
      },
      [0.5],
    );
    expect(res.x[0]).toBe(2);
    expect(res.cost).toBeCloseTo(1, 12);
  });

  it("fits an exponential decay exactly (synthetic data, known parameters)", () => {
    const t = Array.from({ length: 20 }, (_, i) => i * 0.25);
    const y = t.map((ti) => 2.5 * Math.exp(-1.3 * ti) + 0.4);
    const res = levenbergMarquardt(
      {
        parameterCount: 3,
        residualCount: t.length,
        residuals(x, out) {
          t.forEach(
            (ti, i) =>
              (out[i] =
                (x[0] as number) * Math.exp(-(x[1] as number) * ti) + (x[2] as number) - (y[i] as number)),
          );
        },
      },
      [1, 0.5, 0],
    );
    expect(res.x[0]).toBeCloseTo(2.5, 6);
    expect(res.x[1]).toBeCloseTo(1.3, 6);
    expect(res.x[2]).toBeCloseTo(0.4, 6);
  });
});
