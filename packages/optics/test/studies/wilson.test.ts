import { describe, expect, it } from "vitest";
import {
  Z_95,
  normalQuantile,
  wilsonInterval,
  wilsonLowerBound,
  zForConfidence,
} from "../../src/studies/wilson.ts";

describe("wilsonInterval", () => {
  // Worked examples of the Wilson score interval (method 3) in Newcombe, Statistics in Medicine 17:857 (1998),
  // Table I, quoted from memory and verified here against the closed formula of Wilson, JASA 22:209 (1927).
  it.each([
    [81, 263, 0.2553, 0.3662],
    [15, 148, 0.0624, 0.1605],
    [0, 20, 0.0, 0.1611],
    [1, 29, 0.0061, 0.1718],
  ])("%i of %i → %f–%f", (s, n, low, high) => {
    const ci = wilsonInterval(s, n);
    expect(ci.low).toBeCloseTo(low, 4);
    expect(ci.high).toBeCloseTo(high, 4);
    expect(ci.confidence).toBe(0.95);
    expect(ci.method).toBe("wilson");
  });

  it("is exactly [0,·] at zero successes and [·,1] at n (limiting case of the formula)", () => {
    expect(wilsonInterval(0, 50).low).toBe(0);
    expect(wilsonInterval(50, 50).high).toBe(1);
    expect(wilsonInterval(50, 50).low).toBeCloseTo(1 - wilsonInterval(0, 50).high, 12);
  });

  it("reports the confidence of another z as 2Φ(z) − 1 (z = 1 → 0.6827, standard normal table)", () => {
    expect(wilsonInterval(5, 10, 1).confidence).toBeCloseTo(0.6827, 4);
  });

  it("rejects bad input with a RangeError naming the value", () => {
    expect(() => wilsonInterval(5, 0)).toThrow(/n must be a positive integer, got 0/);
    expect(() => wilsonInterval(11, 10)).toThrow(/got 11/);
    expect(() => wilsonInterval(2.5, 10)).toThrow(RangeError);
  });
});

describe("normalQuantile and zForConfidence", () => {
  // Standard normal table values (Abramowitz & Stegun, Handbook of Mathematical Functions, Table 26.5).
  it.each([
    [0.975, 1.959964],
    [0.95, 1.644854],
    [0.995, 2.575829],
    [0.9, 1.281552],
    [0.5, 0],
    [0.001, -3.090232],
  ])("Φ⁻¹(%f) = %f", (p, z) => {
    expect(normalQuantile(p)).toBeCloseTo(z, 5);
  });

  it("two-sided z: 95 % → 1.959964, 99 % → 2.575829, 90 % → 1.644854 (same table)", () => {
    expect(zForConfidence(0.95)).toBe(Z_95);
    expect(zForConfidence(0.99)).toBeCloseTo(2.575829, 5);
    expect(zForConfidence(0.9)).toBeCloseTo(1.644854, 5);
  });

  it("refuses confidences outside [0.5, 1) and quantiles outside (0, 1)", () => {
    expect(() => zForConfidence(1)).toThrow(/confidence must be in \[0.5, 1\), got 1/);
    expect(() => zForConfidence(0.2)).toThrow(RangeError);
    expect(() => normalQuantile(0)).toThrow(/got 0/);
  });
});

describe("wilsonLowerBound", () => {
  it("matches Newcombe (1998) Table I at 95 %: 81 of 263 → 0.2553, 15 of 148 → 0.0624", () => {
    expect(wilsonLowerBound(81, 263)).toBeCloseTo(0.2553, 4);
    expect(wilsonLowerBound(15, 148, 0.95)).toBeCloseTo(0.0624, 4);
  });

  it("N = 2000, p̂ = 0.95 at 95 % gives 0.93956 (Wilson 1927 closed formula; the 'about 0.94' of the domain brief)", () => {
    // Hand computation with z = 1.959964: centre = (0.95 + z²/4000)/(1 + z²/2000) = 0.949137,
    // half-width = z·√(0.95·0.05/2000 + z²/(4·2000²))/(1 + z²/2000) = 0.009581, low = 0.939556.
    expect(wilsonLowerBound(1900, 2000, 0.95)).toBeCloseTo(0.939556, 6);
  });

  it("is lower at 99 % than at 95 % (z = 2.575829): 1900 of 2000 → 0.935892", () => {
    expect(wilsonLowerBound(1900, 2000, 0.99)).toBeCloseTo(0.935892, 5);
    expect(wilsonLowerBound(1900, 2000, 0.99)).toBeLessThan(wilsonLowerBound(1900, 2000, 0.95));
  });

  it("one passing trial of one bounds the yield at 0.2065 only (why a 1-trial run is no evidence)", () => {
    // Wilson 1927 with n = 1, p̂ = 1: low = 1/(1 + z²) = 1/(1 + 3.841459) = 0.206549.
    expect(wilsonLowerBound(1, 1)).toBeCloseTo(0.206549, 6);
  });
});
