import seedrandom from "seedrandom";

const SQRT3 = Math.sqrt(3);

/**
 * Per-trial random stream. Trial i of a study draws only from `seedrandom.alea(`${seed}#${i}`)`
 * (Baagøe's Alea generator as shipped in seedrandom 3; about four times cheaper to seed than the
 * default ARC4, which matters with one fresh generator per trial), so a trial's numbers never depend
 * on which worker or chunk ran it.
 */
export class TrialRandom {
  private rng: seedrandom.PRNG = seedrandom.alea("");
  private spare = 0;
  private hasSpare = false;

  /** Re-seed for trial `index` of the study seeded with `seed`. */
  reset(seed: string, index: number): void {
    this.rng = seedrandom.alea(`${seed}#${index}`);
    this.hasSpare = false;
  }

  /** Uniform on [0, 1) with 53 bits (seedrandom's `double`). */
  uniform(): number {
    return this.rng.double();
  }

  /** Standard normal by the Box–Muller transform (pairs; the second value is kept for the next call). */
  normal(): number {
    if (this.hasSpare) {
      this.hasSpare = false;
      return this.spare;
    }
    const u1 = 1 - this.rng.double(); // (0, 1]: log is finite
    const u2 = this.rng.double();
    const radius = Math.sqrt(-2 * Math.log(u1));
    const angle = 2 * Math.PI * u2;
    this.spare = radius * Math.sin(angle);
    this.hasSpare = true;
    return radius * Math.cos(angle);
  }

  /**
   * Standard draw of unit variance: normal (optionally truncated to |z| ≤ truncate by rejection)
   * or uniform on [−√3, √3].
   */
  draw(distribution: "normal" | "uniform", truncate?: number): number {
    if (distribution === "uniform") return (2 * this.rng.double() - 1) * SQRT3;
    if (truncate === undefined) return this.normal();
    for (;;) {
      const z = this.normal();
      if (Math.abs(z) <= truncate) return z;
    }
  }
}
