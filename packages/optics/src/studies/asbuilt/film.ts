/**
 * n, k and thickness of a single witness film on a known substrate from its T (and R) spectra.
 *
 * Dispersion: the materials module's Cauchy model with its Urbach tail (the fit evaluates it here, per
 * wavelength, so that the tail's parameters can be varied freely):
 *   n(λ) = A + B/λ² + C/λ⁴ (λ in µm; Cauchy), k(λ) = k₀ exp((E − E₀)/E_U) (Urbach tail; Urbach, Phys.
 *   Rev. 92:1324, 1953), E = hc/λ = 1239.84198/λ[nm] eV, E₀ the photon energy at the shortest measured
 *   wavelength (so k₀ is k there), E_U the Urbach energy.
 * The film is computed by the engine (characteristic matrix, incoherent substrate back surface when the
 * substrate's `backside` is set) with its n, k written as a table material at the measured wavelengths.
 * Global stage: a grid over A and the thickness (fringe order) before the local fit — the classic failure
 * of a local fit of a thick film is a wrong fringe order — over the whole range and, for strongly dispersive
 * films, over the long-wavelength half first (range continuation). Cross-check: Swanepoel's envelope method
 * (J. Phys. E 16:1214, 1983) gives the same n at the transmission extrema  of a weakly absorbing film,
 * n = √(M + √(M² − s²)), M = 2s/T_m − (s² + 1)/2 (tested).
 */
import {
  createStackEvaluator,
  HC_EV_NM,
  MaterialSchema,
  parseDesign,
  type Design,
  type Material,
} from "../../core/index.ts";
import { levenbergMarquardt } from "../least-squares.ts";
import { gram, invertSpd } from "./linalg.ts";
import { DEFAULT_UNCERTAINTY_PCT, validateMeasured, type MeasuredSpectrum } from "./measurement.ts";

/** Cauchy n with an Urbach absorption tail (see the module comment). */
export interface CauchyUrbach {
  A: number;
  /** µm² */
  B: number;
  /** µm⁴ */
  C: number;
  /** k at E0 */
  k0: number;
  /** eV */
  E0: number;
  /** Urbach energy, eV */
  Eu: number;
}

/** n and k of the Cauchy–Urbach model at a vacuum wavelength in nm (N = n − ik). */
export function cauchyUrbach(p: CauchyUrbach, wavelengthNm: number): { n: number; k: number } {
  const l2 = (wavelengthNm / 1000) ** 2;
  const E = HC_EV_NM / wavelengthNm;
  return { n: p.A + p.B / l2 + p.C / (l2 * l2), k: p.k0 * Math.exp((E - p.E0) / p.Eu) };
}

/** Options of {@link fitWitnessFilm}. */
export interface FilmFitOptions {
  /** the substrate: a library material id or a material given here */
  substrate: string | Material;
  substrateThicknessMm: number;
  /** count the substrate's back surface incoherently (a plate measured through; default true) */
  backside?: boolean;
  /** search range of the film thickness, nm (default 50–3000) */
  thicknessRangeNm?: [number, number];
  /** search range of the Cauchy A (default 1.3–4.5) */
  indexRange?: [number, number];
  /** fit the Urbach tail (default true); false = lossless Cauchy */
  absorbing?: boolean;
  /** fit the C/λ⁴ term (default false) */
  fitC?: boolean;
  /** material id for the result (default "witness-film") */
  materialId?: string;
  materialName?: string;
}

/** Result of {@link fitWitnessFilm}. */
export interface FilmFitResult {
  thicknessNm: number;
  thicknessSeNm: number;
  model: CauchyUrbach;
  /** standard errors of A, B, C, k0, Eu (0 for terms not fitted) */
  modelSe: { A: number; B: number; C: number; k0: number; Eu: number };
  /** the fitted film as a Cauchy material with an Urbach tail, valid over the measured range, ready to store */
  material: Material;
  residualRmsPct: number;
  /** χ²/(n − p) with the stated uncertainties */
  residualVariance: number;
  fitted: number[][];
  warnings: string[];
}

/**
 * Fit thickness and Cauchy(–Urbach) dispersion of one film to its measured T (and R) spectra.
 * Throws RangeError naming the offending value for bad input.
 */
export function fitWitnessFilm(measurements: MeasuredSpectrum[], options: FilmFitOptions): FilmFitResult {
  if (!Array.isArray(measurements) || measurements.length === 0)
    throw new RangeError(
      `measurements: expected at least one measured spectrum, got ${measurements?.length ?? 0}`,
    );
  measurements.forEach((m, k) => validateMeasured(m, `measurements[${k}]`));
  if (!(options.substrateThicknessMm > 0))
    throw new RangeError(
      `substrateThicknessMm: expected a thickness > 0 mm, got ${options.substrateThicknessMm}`,
    );
  const [dLo, dHi] = options.thicknessRangeNm ?? [50, 3000];
  if (!(dLo > 0 && dHi > dLo))
    throw new RangeError(`thicknessRangeNm: expected 0 < low < high, got ${dLo}, ${dHi}`);
  const [aLo, aHi] = options.indexRange ?? [1.3, 4.5];
  if (!(aLo >= 1 && aHi > aLo))
    throw new RangeError(`indexRange: expected 1 ≤ low < high, got ${aLo}, ${aHi}`);
  const absorbing = options.absorbing ?? true;
  const fitC = options.fitC ?? false;
  const subMaterial = typeof options.substrate === "string" ? undefined : options.substrate;
  const subId = typeof options.substrate === "string" ? options.substrate : options.substrate.id;
  const all = [...new Set(measurements.flatMap((m) => Array.from(m.wavelengths)))].sort((a, b) => a - b);
  const E0 = HC_EV_NM / (all[0] as number);
  const filmId = options.materialId ?? "witness-film";
  const tableOf = (p: CauchyUrbach): Material => ({
    id: filmId,
    name: options.materialName ?? "Witness film (fitted)",
    role: "layer",
    source: "fitted to measured spectra (Cauchy + Urbach tail)",
    model: {
      kind: "table",
      extrapolate: false,
      points: all.map((w) => {
        const v = cauchyUrbach(p, w);
        return [w, Math.max(v.n, 1e-6), Math.max(v.k, 0)] as [number, number, number];
      }),
    },
  });
  const designFor = (p: CauchyUrbach, d: number): Design => ({
    format: "stackproof.design/v1",
    name: "witness film",
    referenceWavelength: all[Math.floor(all.length / 2)] as number,
    incident: "air",
    exit: "air",
    layers: [{ material: filmId, thickness: d }],
    substrate: {
      material: subId,
      thicknessMm: options.substrateThicknessMm,
      backside: options.backside ?? true,
    },
    materials: [tableOf(p), ...(subMaterial ? [subMaterial] : [])],
  });
  // validate once (substrate id, material) with the full parser; the fit loop builds the same shape directly
  parseDesign(designFor({ A: 2, B: 0, C: 0, k0: 0, E0, Eu: 1 }, 100));
  // parameters: d, A, B, [C], [ln k0, Eu]
  const names = ["d", "A", "B", ...(fitC ? ["C"] : []), ...(absorbing ? ["lnk0", "Eu"] : [])];
  const P = names.length;
  const unpack = (x: ArrayLike<number>): { p: CauchyUrbach; d: number } => {
    let i = 3;
    const C = fitC ? (x[i++] as number) : 0;
    const k0 = absorbing ? Math.exp(x[i++] as number) : 0;
    const Eu = absorbing ? (x[i++] as number) : 1;
    return { d: x[0] as number, p: { A: x[1] as number, B: x[2] as number, C, k0, E0, Eu } };
  };
  const thick = new Float64Array(1);
  /** Weighted residuals of a set of spectra: model(x) fills res, cost(x) is Σ res². */
  const residualsOf = (ms: MeasuredSpectrum[]) => {
    const count = ms.reduce((s, m) => s + m.wavelengths.length, 0);
    const outs = ms.map((m) => ({
      R: new Float64Array(m.wavelengths.length),
      T: new Float64Array(m.wavelengths.length),
      A: new Float64Array(m.wavelengths.length),
    }));
    const model = (x: ArrayLike<number>, res: Float64Array): void => {
      const { p, d } = unpack(x);
      const design = designFor(p, d);
      thick[0] = d;
      let off = 0;
      ms.forEach((m, k) => {
        const ev = createStackEvaluator(design, {
          wavelengths: m.wavelengths,
          angleDeg: m.angleDeg,
          polarization: m.polarization,
        });
        const o = outs[k]!;
        ev.evaluate(thick, o);
        const q = m.quantity === "R" ? o.R : o.T;
        const u = m.uncertaintyPct ?? DEFAULT_UNCERTAINTY_PCT;
        for (let i = 0; i < q.length; i++)
          res[off + i] = ((q[i] as number) * 100 - (m.values[i] as number)) / u;
        off += q.length;
      });
    };
    /** Grid over A and d at B = 0, no absorption (costs of every grid point). */
    const grid = (): { c: number; x: number[] }[] => {
      const cand: { c: number; x: number[] }[] = [];
      const shortest = Math.min(...ms.map((m) => m.wavelengths[0] as number));
      for (let A = aLo; A <= aHi + 1e-9; A += 0.05) {
        const design = designFor({ A, B: 0, C: 0, k0: 0, E0, Eu: 1 }, 100);
        const evs = ms.map((m) =>
          createStackEvaluator(design, {
            wavelengths: m.wavelengths,
            angleDeg: m.angleDeg,
            polarization: m.polarization,
          }),
        );
        // d step: a twentieth of a fringe at the shortest wavelength (Δ(2 n d) = λ/10)
        const step = shortest / (20 * A);
        for (let d = dLo; d <= dHi; d += step) {
          thick[0] = d;
          let c = 0;
          ms.forEach((m, k) => {
            const o = outs[k]!;
            evs[k]!.evaluate(thick, o);
            const q = m.quantity === "R" ? o.R : o.T;
            const u = m.uncertaintyPct ?? DEFAULT_UNCERTAINTY_PCT;
            for (let i = 0; i < q.length; i++)
              c += (((q[i] as number) * 100 - (m.values[i] as number)) / u) ** 2;
          });
          cand.push({ c, x: [d, A, 0, ...tail()] });
        }
      }
      return cand.sort((a, b) => a.c - b.c);
    };
    return { count, model, grid };
  };
  const lnk0Start = Math.log(1e-3);
  const EuStart = 0.2;
  const tail = (): number[] => [...(fitC ? [0] : []), ...(absorbing ? [lnk0Start, EuStart] : [])];
  const lower = Float64Array.from(
    names,
    (nm) => ({ d: dLo * 0.9, A: 1, B: -0.5, C: -0.1, lnk0: -25, Eu: 0.01 })[nm as "d"],
  );
  const upper = Float64Array.from(
    names,
    (nm) => ({ d: dHi * 1.1, A: 6, B: 2, C: 0.1, lnk0: 2, Eu: 3 })[nm as "d"],
  );
  const steps = Float64Array.from(
    names,
    (nm) => ({ d: 1e-3, A: 1e-6, B: 1e-6, C: 1e-7, lnk0: 1e-4, Eu: 1e-5 })[nm as "d"],
  );
  const localFit = (r: ReturnType<typeof residualsOf>, start: ArrayLike<number>) =>
    levenbergMarquardt(
      {
        parameterCount: P,
        residualCount: r.count,
        residuals: (x, res) => r.model(x, res),
        lower,
        upper,
        steps,
      },
      start,
      { maxIterations: 200, relativeTolerance: 1e-12 },
    );
  /** The few best grid points that are not near one another (another fringe order or index). */
  const distinct = (cand: { c: number; x: number[] }[], max: number): number[][] => {
    const seen: number[][] = [];
    for (const c of cand) {
      if (seen.length >= max) break;
      if (
        seen.some(
          (s) =>
            Math.abs((s[0] as number) - (c.x[0] as number)) < 20 &&
            Math.abs((s[1] as number) - (c.x[1] as number)) < 0.2,
        )
      )
        continue;
      seen.push(c.x);
    }
    return seen;
  };
  const full = residualsOf(measurements);
  const n = full.count;
  const model = full.model;
  const cost = (x: ArrayLike<number>, res: Float64Array): number => {
    model(x, res);
    let s = 0;
    for (let i = 0; i < res.length; i++) s += (res[i] as number) ** 2;
    return s;
  };
  const res = new Float64Array(n);
  // Global stage 1: grid over A and d at B = 0 on the whole range; the local fit starts from the best few.
  const starts: number[][] = distinct(full.grid(), 4);
  // Global stage 2 (range continuation): a strongly dispersive film (n falling by 0.5 over the range, as in
  // Swanepoel's example) matches no B = 0 grid point over the whole range, so the grid is also run on the
  // long-wavelength half of the fringes (1/λ above the midpoint in 1/λ), fitted there with B free, and the
  // result extended to the whole range (common practice, no source).
  const invMid = (1 / (all[0] as number) + 1 / (all[all.length - 1] as number)) / 2;
  const longHalf = measurements
    .map((m) => {
      const keep: number[] = [];
      for (let i = 0; i < m.wavelengths.length; i++)
        if (1 / (m.wavelengths[i] as number) <= invMid) keep.push(i);
      return {
        ...m,
        wavelengths: keep.map((i) => m.wavelengths[i] as number),
        values: keep.map((i) => m.values[i] as number),
      };
    })
    .filter((m) => m.wavelengths.length >= 8);
  if (longHalf.length > 0) {
    const half = residualsOf(longHalf);
    for (const x0 of distinct(half.grid(), 4)) starts.push(Array.from(localFit(half, x0).x));
  }
  let best: ReturnType<typeof levenbergMarquardt> | null = null;
  for (const x0 of starts) {
    const f = localFit(full, x0);
    if (!best || f.cost < best.cost) best = f;
  }
  const x = best!.x;
  // covariance from the Jacobian at the solution (central differences), scaled by max(1, χ²/dof)
  const J = new Float64Array(n * P);
  const rp = new Float64Array(n);
  const rm = new Float64Array(n);
  const xp = new Float64Array(x);
  for (let a = 0; a < P; a++) {
    const h = (steps[a] as number) * 10;
    xp.set(x);
    xp[a] = (x[a] as number) + h;
    model(xp, rp);
    xp[a] = (x[a] as number) - h;
    model(xp, rm);
    for (let i = 0; i < n; i++) J[i * P + a] = ((rp[i] as number) - (rm[i] as number)) / (2 * h);
  }
  const chi2 = cost(x, res);
  const s2 = chi2 / Math.max(1, n - P);
  const inv = invertSpd(gram(J, n, P), P);
  const warnings: string[] = [];
  if (!inv)
    warnings.push("The fit matrix is singular: some dispersion terms are not determined by these spectra.");
  const se = (name: string): number => {
    const a = names.indexOf(name);
    return a < 0 || !inv ? 0 : Math.sqrt(Math.max(1, s2) * (inv[a * P + a] as number));
  };
  const { p, d } = unpack(x);
  if (s2 > 4)
    warnings.push(
      `χ²/dof = ${s2.toFixed(1)}: the Cauchy–Urbach film does not explain the spectra to within their uncertainty.`,
    );
  let rss = 0;
  let off = 0;
  const fitted = measurements.map((m) => {
    const u = m.uncertaintyPct ?? DEFAULT_UNCERTAINTY_PCT;
    const arr = Array.from({ length: m.wavelengths.length }, (_, i) => {
      const r = (res[off + i] as number) * u;
      rss += r * r;
      return (m.values[i] as number) + r;
    });
    off += m.wavelengths.length;
    return arr;
  });
  return {
    thicknessNm: d,
    thicknessSeNm: se("d"),
    model: p,
    modelSe: { A: se("A"), B: se("B"), C: se("C"), k0: p.k0 * se("lnk0"), Eu: se("Eu") },
    material: MaterialSchema.parse({
      id: filmId,
      name: options.materialName ?? "Witness film (fitted)",
      role: "layer",
      source: "fitted to measured spectra (Cauchy + Urbach tail)",
      model: {
        kind: "cauchy",
        A: p.A,
        B: p.B,
        C: p.C,
        ...(absorbing ? { urbach: { k0: p.k0, E0: p.E0, Eu: p.Eu } } : {}),
        range: [all[0] as number, all[all.length - 1] as number],
      },
    }),
    residualRmsPct: Math.sqrt(rss / n),
    residualVariance: s2,
    fitted,
    warnings,
  };
}
