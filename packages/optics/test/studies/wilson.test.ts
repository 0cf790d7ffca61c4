import { describe, expect, it } from "vitest";
import { wilsonInterval } from "../../src/studies/wilson.ts";

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
