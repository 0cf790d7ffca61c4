/**
 * Closed-form monitoring signal of one homogeneous, lossless layer growing on a fixed built stack.
 *
 * The built stack (substrate plus the layers already on the monitored chip) is summarised by its
 * characteristic vector [B0, C0] = M_built · [1, η_sub] at the monitoring wavelength λm (Macleod,
 * *Thin-Film Optical Filters*, characteristic matrix; normal incidence, admittances in free-space
 * units, incident medium vacuum η0 = 1). A growing layer of real index n and phase δ = 2π n d / λm gives
 *   η0 B + C = P cos δ + Q sin δ,  P = η0 B0 + C0,  Q = i (η0 C0 / n + n B0),
 * so |η0 B + C|² = A0 + A1 cos 2δ + A2 sin 2δ = A0 + ρ cos θ with θ = 2δ − φ, ρ = √(A1² + A2²),
 * φ = atan2(A2, A1), and T(δ) = 4 η0 Re(η_sub) / (A0 + ρ cos θ); R = 1 − T for a lossless stack.
 * Turning points are at θ = mπ, i.e. every quarter wave of optical thickness, shifted by the phase φ
 * at which the running admittance is real; level crossings solve cos θ = c in closed form.
 */

/** Running characteristic vector [B, C] of a monitored stack at one wavelength (complex, split parts). */
export interface MonitorVector {
  br: number;
  bi: number;
  cr: number;
  ci: number;
}

/** Reset to the bare substrate of (lossless) admittance `ns`: [B, C] = [1, ns]. */
export function resetVector(v: MonitorVector, ns: number): void {
  v.br = 1;
  v.bi = 0;
  v.cr = ns;
  v.ci = 0;
}

/**
 * Add a lossless layer of index n and physical thickness d (nm) at wavelength λ (nm):
 * [B, C] ← [[cos δ, i sin δ / n], [i n sin δ, cos δ]] · [B, C].
 */
export function applyLayer(v: MonitorVector, n: number, d: number, lambda: number): void {
  const delta = (2 * Math.PI * n * d) / lambda;
  const c = Math.cos(delta);
  const s = Math.sin(delta);
  const { br, bi, cr, ci } = v;
  // i s/n · C = (−s ci / n) + i (s cr / n)
  v.br = c * br - (s * ci) / n;
  v.bi = c * bi + (s * cr) / n;
  // i n s · B = (−n s bi) + i (n s br)
  v.cr = c * cr - n * s * bi;
  v.ci = c * ci + n * s * br;
}

/** Closed-form growth curve of one layer on a fixed stack (see the module comment). */
export interface GrowthCurve {
  /** 4 η0 Re(η_sub) */
  K: number;
  A0: number;
  rho: number;
  phi: number;
  /** index of the growing layer (real) */
  n: number;
  /** monitoring wavelength, nm */
  lambda: number;
  /** true: the signal is R = 1 − T */
  reflect: boolean;
}

/** Fill `out` with the growth curve of a layer of index n at λ on the stack summarised by `v`. */
export function growthCurve(
  v: MonitorVector,
  ns: number,
  n: number,
  lambda: number,
  reflect: boolean,
  out: GrowthCurve,
): GrowthCurve {
  const pr = v.br + v.cr;
  const pi = v.bi + v.ci;
  // Q = i (C0/n + n B0)
  const ur = v.cr / n + n * v.br;
  const ui = v.ci / n + n * v.bi;
  const qr = -ui;
  const qi = ur;
  const p2 = pr * pr + pi * pi;
  const q2 = qr * qr + qi * qi;
  const a1 = (p2 - q2) / 2;
  const a2 = pr * qr + pi * qi;
  out.K = 4 * ns;
  out.A0 = (p2 + q2) / 2;
  out.rho = Math.hypot(a1, a2);
  out.phi = Math.atan2(a2, a1);
  out.n = n;
  out.lambda = lambda;
  out.reflect = reflect;
  return out;
}

/** Transmittance at phase θ of the curve. */
export function transmittanceAtTheta(g: GrowthCurve, theta: number): number {
  return g.K / (g.A0 + g.rho * Math.cos(theta));
}

/** θ = 2δ − φ of a deposited physical thickness d (nm). */
export function thetaOfThickness(g: GrowthCurve, d: number): number {
  return (4 * Math.PI * g.n * d) / g.lambda - g.phi;
}

/** Physical thickness (nm) at phase θ. */
export function thicknessOfTheta(g: GrowthCurve, theta: number): number {
  return ((theta + g.phi) * g.lambda) / (4 * Math.PI * g.n);
}

/** Monitoring signal (T, or R = 1 − T) at deposited thickness d (nm). */
export function signalAt(g: GrowthCurve, d: number): number {
  const t = transmittanceAtTheta(g, thetaOfThickness(g, d));
  return g.reflect ? 1 - t : t;
}

/**
 * Phase θ where the cut fires for a turning-point criterion: the extremum θ = (2m + parity)π nearest
 * `thetaExpected`, then past it until the transmittance has retreated by `retreat` (≥ 0, in signal
 * units; R retreats by the same amount as T). `parity` 0: cos θ = +1 (T minimum), 1: T maximum.
 * Returns the phase of the extremum in `ext[0]` and the cut phase in `ext[1]`.
 */
export function turningCut(
  g: GrowthCurve,
  thetaExpected: number,
  parity: 0 | 1,
  retreat: number,
  ext: Float64Array,
): void {
  const m = Math.round((thetaExpected - parity * Math.PI) / (2 * Math.PI));
  const thetaExt = (2 * m + parity) * Math.PI;
  ext[0] = thetaExt;
  if (!(retreat > 0) || g.rho === 0) {
    ext[1] = thetaExt;
    return;
  }
  const sign = parity === 0 ? 1 : -1; // cos θ at the extremum
  const tExt = g.K / (g.A0 + sign * g.rho);
  const tOther = g.K / (g.A0 - sign * g.rho);
  // T moves from tExt toward tOther as |u| grows from 0 to π
  let tTarget = parity === 1 ? tExt - retreat : tExt + retreat;
  if (parity === 1 ? tTarget < tOther : tTarget > tOther) tTarget = tOther;
  let cu = (g.K / tTarget - g.A0) / (sign * g.rho);
  cu = cu > 1 ? 1 : cu < -1 ? -1 : cu;
  ext[1] = thetaExt + Math.acos(cu);
}

/**
 * Phase θ where a level criterion fires: the transmittance reaches `tTarget` moving in direction
 * `dirT` (+1 rising, −1 falling), at the crossing nearest `thetaExpected`. When the target lies
 * outside the signal's range, the cut falls at the extremum closest to the target nearest the expected
 * end (the signal turns back there). Returns θ.
 */
export function levelCut(g: GrowthCurve, thetaExpected: number, tTarget: number, dirT: 1 | -1): number {
  if (g.rho === 0) return thetaExpected;
  const c = (g.K / tTarget - g.A0) / g.rho;
  if (c >= -1 && c <= 1) {
    const base = dirT * Math.acos(c);
    const m = Math.round((thetaExpected - base) / (2 * Math.PI));
    return base + 2 * Math.PI * m;
  }
  // c > 1: target below the minimum (at cos θ = 1); c < −1: above the maximum (cos θ = −1)
  const parity = c > 1 ? 0 : 1;
  const m = Math.round((thetaExpected - parity * Math.PI) / (2 * Math.PI));
  return (2 * m + parity) * Math.PI;
}
