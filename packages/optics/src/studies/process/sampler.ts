/**
 * Trial sampler of a process model: produces the thicknesses (nm) and index factors of one simulated
 * build, layer by layer in deposition order, as the chamber's controls would make them. Optical
 * monitoring grows each layer on the stack as actually built in that trial (its real preceding
 * thicknesses and indices) and stops where the noisy criterion fires (closed form, see monitor.ts).
 */
import type { Design } from "../../core/index.ts";
import { getMaterial, refractiveIndex } from "../../core/index.ts";
import type { ErrorModel, TrialSampler } from "../error-model.ts";
import { createTrialSampler } from "../error-model.ts";
import type { TrialRandom } from "../random.ts";
import {
  applyLayer,
  growthCurve,
  levelCut,
  resetVector,
  thetaOfThickness,
  thicknessOfTheta,
  transmittanceAtTheta,
  turningCut,
} from "./monitor.ts";
import type { GrowthCurve, MonitorVector } from "./monitor.ts";
import { ProcessModelSchema } from "./schema.ts";
import type { Control, MonitoringStep, ProcessModel } from "./schema.ts";

/**
 * Largest distance, in QWOT at the monitoring wavelength, between a layer's nominal end and a turning
 * point of its nominal signal for a turning-point cut to be accepted (0.02 QWOT, common practice, no source).
 */
export const TURNING_POINT_TOLERANCE_QWOT = 0.02;

/** Distance (in QWOT, θ/π) from phase θ to the nearest turning point θ = mπ. */
function turningDistance(theta: number): number {
  return Math.abs(theta / Math.PI - Math.round(theta / Math.PI));
}

/**
 * Default monitoring plan of a design: every layer monitored on the part at the reference wavelength
 * λ0; a turning-point cut for each layer whose nominal end lies on a turning point of its signal on the
 * nominal stack (within {@link TURNING_POINT_TOLERANCE_QWOT}) and that is at least half a quarter wave
 * thick — the quarter-wave layers of an all-quarter-wave stack — and a level cut for the others
 * (common practice, no source). Absorbing materials at λ0 get a level step (their monitoring is refused
 * by the sampler).
 */
export function defaultMonitoringPlan(design: Design): MonitoringStep[] {
  const lambda = design.referenceWavelength;
  const ix = (id: string) => refractiveIndex(getMaterial(id, design.materials).model, lambda);
  const ns = ix(design.substrate.material).n;
  const v: MonitorVector = { br: 1, bi: 0, cr: ns, ci: 0 };
  const g: GrowthCurve = { K: 0, A0: 0, rho: 0, phi: 0, n: 1, lambda, reflect: false };
  return design.layers.map((l) => {
    const n = ix(l.material).n;
    growthCurve(v, ns, n, lambda, false, g);
    const theta = thetaOfThickness(g, l.thickness);
    const turning =
      g.rho > 0 && (4 * n * l.thickness) / lambda >= 0.5 && turningDistance(theta) <= TURNING_POINT_TOLERANCE_QWOT;
    applyLayer(v, n, l.thickness, lambda);
    return { wavelength: lambda, on: "part", criterion: turning ? "turning" : "level" };
  });
}

/** One layer of a simulated monitoring trace. */
export interface MonitoringTrace {
  layer: number;
  material: string;
  wavelength: number;
  on: "part" | "witness";
  criterion: "turning" | "level";
  signal: "T" | "R";
  /** deposited thickness on the monitored chip (nm) and the true signal there (fraction 0..1) */
  thickness: number[];
  values: number[];
  /** the nominal stack's signal at the same thicknesses (what the plan expected) */
  nominalValues: number[];
  /** level criterion: the trigger (signal fraction); null for turning points */
  trigger: number | null;
  /** where the criterion fired (nm on the chip) and the true signal there */
  cut: { thickness: number; value: number };
  /** final thickness on the chip after overshoot (nm) and the nominal thickness (nm) */
  finalThickness: number;
  nominalThickness: number;
  /** photometric noise σ (signal fraction) at the cut */
  noiseSigma: number;
}

/** A trial sampler driven by a process model, with monitoring traces of single builds. */
export interface ProcessSampler extends TrialSampler {
  readonly process: ProcessModel;
  /** The resolved monitoring plan (one step per layer). */
  readonly plan: readonly MonitoringStep[];
  /**
   * Simulate trial `index` of `seed` and return the monitoring traces of its optically monitored
   * layers, `points` samples per layer (≥ 2), plus the realised thicknesses on the part (nm).
   */
  traces(
    rng: TrialRandom,
    seed: string,
    index: number,
    points?: number,
  ): { traces: MonitoringTrace[]; thicknesses: number[]; indexScale: number[] };
}

const enum Method {
  Time = 0,
  Crystal = 1,
  Optical = 2,
}

interface Slot {
  lambda: number;
  witness: boolean;
  /** substrate admittance (real) at λ */
  ns: number;
  /** nominal real index of each layer at λ */
  n: Float64Array;
  v: MonitorVector;
}

/**
 * Build the sampler for `model` (which must carry a process) and `design`. Draw order per trial (fixed,
 * independent of which spreads are zero): per material (sorted ids) one index-drift draw; per material
 * the run draw (rate error or tooling), the initial rate drift and the initial index drift; one uniform
 * for the part's position; then per layer: one index-noise draw, per material two drift innovations
 * (rate, index), and four layer draws (time: within-layer, shutter; crystal: noise, termination;
 * optical: photometric noise at the extremum and at the cut, gain drift, overshoot).
 * @throws RangeError when a material has no control, the plan length does not match, or an optically
 *   monitored stack absorbs at its monitoring wavelength (not modelled).
 */
export function createProcessSampler(model: ErrorModel, design: Design): ProcessSampler {
  if (!model.process) throw new RangeError("errorModel.process: expected a process model, got nothing");
  const process = ProcessModelSchema.parse(model.process);
  const layerMaterials = design.layers.map((l) => l.material);
  const L = layerMaterials.length;
  const materials = [...new Set(layerMaterials)].sort();
  const M = materials.length;
  const materialOf = Int32Array.from(layerMaterials, (m) => materials.indexOf(m));
  const controls: Control[] = materials.map((m) => {
    if ("method" in process.control) return process.control as Control;
    const c = (process.control as Record<string, Control>)[m];
    if (!c) throw new RangeError(`errorModel.process.control: no control for material ${JSON.stringify(m)}`);
    return c;
  });
  if (!("method" in process.control)) {
    for (const id of Object.keys(process.control))
      if (!materials.includes(id))
        throw new RangeError(`errorModel.process.control names material ${JSON.stringify(id)}, which no layer uses`);
  }
  const method = Int32Array.from(controls, (c) =>
    c.method === "time" ? Method.Time : c.method === "crystal" ? Method.Crystal : Method.Optical,
  );
  const anyOptical = controls.some((c) => c.method === "optical");
  if (process.plan && process.plan.length !== L)
    throw new RangeError(`errorModel.process.plan: expected ${L} steps (one per layer), got ${process.plan.length}`);
  const plan: MonitoringStep[] = process.plan ?? defaultMonitoringPlan(design);
  const witnessEvery = process.witness?.everyLayers ?? 0;
  if (anyOptical) {
    for (let j = 0; j < L; j++) {
      const step = plan[j] as MonitoringStep;
      if (method[materialOf[j] as number] === Method.Optical && step.on === "witness" && witnessEvery === 0)
        throw new RangeError(`errorModel.process.plan[${j}].on: "witness" needs process.witness.everyLayers`);
    }
  }

  // Per-material spreads (fractions).
  const perMat = (v: ErrorModel["systematicPct"], m: string): number =>
    v === undefined ? 0 : typeof v === "number" ? v / 100 : (v[m] ?? 0) / 100;
  const baseDriftSigma = Float64Array.from(materials, (m) => perMat(model.indexDriftPct, m));
  const indexNoise = (model.indexNoisePct ?? 0) / 100;
  const runSigma = Float64Array.from(controls, (c) =>
    c.method === "time" ? c.rateErrorPct / 100 : c.method === "crystal" ? c.toolingPct / 100 : 0,
  );
  const rateDriftSigma = Float64Array.from(controls, (c) => (c.method === "time" ? c.rateDriftPct / 100 : 0));
  const indexArSigma = Float64Array.from(controls, (c) => (c.method === "time" ? c.indexDriftPct / 100 : 0));
  const rho = Float64Array.from(controls, (c) => (c.method === "time" ? c.driftCorrelation : 0));
  const innov = Float64Array.from(rho, (r) => Math.sqrt(1 - r * r));
  const layerA = Float64Array.from(controls, (c) =>
    c.method === "time" ? c.withinLayerPct / 100 : c.method === "crystal" ? c.noisePct / 100 : 0,
  );
  const layerB = Float64Array.from(controls, (c) =>
    c.method === "time" ? c.shutterNm : c.method === "crystal" ? c.terminationNm : 0,
  );
  const optical = controls.map((c) => (c.method === "optical" ? c : null));
  const hasIndexErrors =
    indexNoise > 0 || baseDriftSigma.some((v) => v > 0) || indexArSigma.some((v) => v > 0);

  // Uniformity: realised thickness on the part = controlled thickness · u(r) / u(r_ref).
  const uni = process.uniformity;
  const uRef = uni ? 1 + uni.a * uni.referenceRadiusMm * uni.referenceRadiusMm : 1;
  if (uni && !(uRef > 0)) throw new RangeError(`errorModel.process.uniformity: 1 + a·r_ref² must be > 0, got ${uRef}`);

  // Monitoring slots: one per distinct (wavelength, part/witness) used by an optically monitored layer.
  const slots: Slot[] = [];
  const slotOf = new Int32Array(L).fill(-1);
  if (anyOptical) {
    const witnessMaterial = process.witness?.substrate ?? design.substrate.material;
    const lossless = (id: string, lambda: number, where: string): number => {
      const v = refractiveIndex(getMaterial(id, design.materials).model, lambda);
      if (v.k !== 0)
        throw new RangeError(
          `${where}: optical monitoring of absorbing material ${JSON.stringify(id)} (k = ${v.k} at ${lambda} nm) is not modelled`,
        );
      return v.n;
    };
    for (let j = 0; j < L; j++) {
      if (method[materialOf[j] as number] !== Method.Optical) continue;
      const step = plan[j] as MonitoringStep;
      const witness = step.on === "witness";
      let s = slots.findIndex((x) => x.lambda === step.wavelength && x.witness === witness);
      if (s < 0) {
        const where = `errorModel.process.plan[${j}]`;
        slots.push({
          lambda: step.wavelength,
          witness,
          ns: lossless(witness ? witnessMaterial : design.substrate.material, step.wavelength, where),
          n: Float64Array.from(layerMaterials, (m) => lossless(m, step.wavelength, where)),
          v: { br: 1, bi: 0, cr: 1, ci: 0 },
        });
        s = slots.length - 1;
      }
      slotOf[j] = s;
    }
  }
  const nominal = Float64Array.from(design.layers, (l) => l.thickness);

  // Nominal run of the plan on the nominal stack: triggers, directions and turning-point parities.
  const trigger = new Float64Array(L); // signal units
  const dirT = new Int8Array(L);
  const parity = new Int8Array(L);
  const curve: GrowthCurve = { K: 0, A0: 0, rho: 0, phi: 0, n: 1, lambda: 1, reflect: false };
  const ext = new Float64Array(2);
  const resetSlots = (witnessOnly: boolean): void => {
    for (const sl of slots) if (!witnessOnly || sl.witness) resetVector(sl.v, sl.ns);
  };
  const deposit = (j: number, d: number, scale: number): void => {
    for (const sl of slots) applyLayer(sl.v, (sl.n[j] as number) * scale, d, sl.lambda);
  };
  const isOpticalLayer = (j: number): boolean => slotOf[j] !== -1;
  if (anyOptical) {
    resetSlots(false);
    for (let j = 0; j < L; j++) {
      if (witnessEvery > 0 && j > 0 && j % witnessEvery === 0) resetSlots(true);
      if (isOpticalLayer(j)) {
        const sl = slots[slotOf[j] as number] as Slot;
        const c = optical[materialOf[j] as number] as NonNullable<(typeof optical)[number]>;
        growthCurve(sl.v, sl.ns, sl.n[j] as number, sl.lambda, c.signal === "R", curve);
        const th = thetaOfThickness(curve, nominal[j] as number);
        const t = transmittanceAtTheta(curve, th);
        trigger[j] = c.signal === "R" ? 1 - t : t;
        dirT[j] = Math.sin(th) >= 0 ? 1 : -1;
        parity[j] = Math.abs(Math.round(th / Math.PI)) % 2;
        const step = plan[j] as MonitoringStep;
        const off = turningDistance(th);
        if (step.criterion === "turning" && off > TURNING_POINT_TOLERANCE_QWOT)
          throw new RangeError(
            `errorModel.process.plan[${j}].criterion: the nominal layer ends ${off.toFixed(3)} QWOT from a turning point at ${sl.lambda} nm (more than ${TURNING_POINT_TOLERANCE_QWOT}); use "level", got "turning"`,
          );
      }
      deposit(j, nominal[j] as number, 1);
    }
  }

  // Per-trial state.
  const driftScale = new Float64Array(M);
  const runErr = new Float64Array(M);
  const rateAr = new Float64Array(M);
  const indexAr = new Float64Array(M);
  const controlled = new Float64Array(L);
  let gain = 0;

  interface TraceSink {
    traces: MonitoringTrace[];
    points: number;
  }

  /** Grow optically monitored layer j on its slot; returns the controlled thickness (nm). */
  function monitorLayer(j: number, scale: number, z1: number, z2: number, z3: number, z4: number, sink?: TraceSink): number {
    const dNom = nominal[j] as number;
    const c = optical[materialOf[j] as number] as NonNullable<(typeof optical)[number]>;
    gain += (c.driftPct / 100) * z3;
    if (!(dNom > 0)) return 0;
    const sl = slots[slotOf[j] as number] as Slot;
    const n = (sl.n[j] as number) * scale;
    growthCurve(sl.v, sl.ns, n, sl.lambda, c.signal === "R", curve);
    const thetaExp = thetaOfThickness(curve, dNom);
    const step = plan[j] as MonitoringStep;
    const sigma = c.noisePct / 100;
    let thetaCut: number;
    let noiseAbs: number;
    if (step.criterion === "turning") {
      turningCut(curve, thetaExp, parity[j] as 0 | 1, 0, ext);
      const tExt = transmittanceAtTheta(curve, ext[0] as number);
      const sExt = c.signal === "R" ? 1 - tExt : tExt;
      noiseAbs = sigma * sExt;
      const detection = (c.detectionPct ?? 3 * c.noisePct) / 100;
      // cut when the reading has retreated by the threshold from the (noisy) extremum reading
      const retreat = detection * sExt + noiseAbs * (z1 - z2);
      turningCut(curve, thetaExp, parity[j] as 0 | 1, retreat, ext);
      thetaCut = ext[1] as number;
    } else {
      const s = trigger[j] as number;
      noiseAbs = sigma * s;
      // measured = S·(1 + gain) + ε fires at S* → true signal (S* − ε)/(1 + gain)
      const sTrue = (s - noiseAbs * z1) / (1 + gain);
      const tTarget = c.signal === "R" ? 1 - sTrue : sTrue;
      thetaCut = levelCut(curve, thetaExp, tTarget, dirT[j] as 1 | -1);
    }
    let dCut = thicknessOfTheta(curve, thetaCut);
    if (dCut < 0) dCut = 0;
    let d = dCut + c.overshootNm + c.overshootSigmaNm * z4;
    if (d < 0) d = 0;
    if (sink) sink.traces.push(traceOf(j, sl, dCut, d, noiseAbs, c.signal, step, sink.points));
    return d;
  }

  function traceOf(
    j: number,
    sl: Slot,
    dCut: number,
    dFinal: number,
    noiseAbs: number,
    signal: "T" | "R",
    step: MonitoringStep,
    points: number,
  ): MonitoringTrace {
    const g: GrowthCurve = { ...curve };
    const dNom = nominal[j] as number;
    const top = Math.max(dFinal, dNom, dCut) * 1.08;
    const thickness: number[] = [];
    const values: number[] = [];
    for (let p = 0; p < points; p++) {
      const d = (top * p) / (points - 1);
      thickness.push(d);
      const t = transmittanceAtTheta(g, thetaOfThickness(g, d));
      values.push(signal === "R" ? 1 - t : t);
    }
    const tc = transmittanceAtTheta(g, thetaOfThickness(g, dCut));
    return {
      layer: j,
      material: layerMaterials[j] as string,
      wavelength: sl.lambda,
      on: step.on,
      criterion: step.criterion,
      signal,
      thickness,
      values,
      nominalValues: [],
      trigger: step.criterion === "level" ? (trigger[j] as number) : null,
      cut: { thickness: dCut, value: signal === "R" ? 1 - tc : tc },
      finalThickness: dFinal,
      nominalThickness: dNom,
      noiseSigma: noiseAbs,
    };
  }

  function run(
    rng: TrialRandom,
    seed: string,
    index: number,
    thicknessOut: Float64Array,
    indexScaleOut: Float64Array,
    sink?: TraceSink,
  ): void {
    rng.reset(seed, index);
    for (let m = 0; m < M; m++) driftScale[m] = 1 + (baseDriftSigma[m] as number) * rng.normal();
    for (let m = 0; m < M; m++) {
      runErr[m] = (runSigma[m] as number) * rng.normal();
      rateAr[m] = (rateDriftSigma[m] as number) * rng.normal();
      indexAr[m] = (indexArSigma[m] as number) * rng.normal();
    }
    const u = rng.uniform();
    let uPart = 1;
    if (uni) {
      const r =
        typeof uni.radiusMm === "number"
          ? uni.radiusMm
          : Math.sqrt(uni.radiusMm.min ** 2 + u * (uni.radiusMm.max ** 2 - uni.radiusMm.min ** 2));
      uPart = (1 + uni.a * r * r) / uRef;
    }
    gain = 0;
    if (anyOptical) resetSlots(false);
    for (let j = 0; j < L; j++) {
      const m = materialOf[j] as number;
      const zIndex = rng.normal();
      for (let k = 0; k < M; k++) {
        const r = rho[k] as number;
        const e = innov[k] as number;
        rateAr[k] = r * (rateAr[k] as number) + e * (rateDriftSigma[k] as number) * rng.normal();
        indexAr[k] = r * (indexAr[k] as number) + e * (indexArSigma[k] as number) * rng.normal();
      }
      const z1 = rng.normal();
      const z2 = rng.normal();
      const z3 = rng.normal();
      const z4 = rng.normal();
      const scale = (driftScale[m] as number) * (1 + indexNoise * zIndex) * (1 + (indexAr[m] as number));
      indexScaleOut[j] = scale;
      if (witnessEvery > 0 && j > 0 && j % witnessEvery === 0 && anyOptical) resetSlots(true);
      const d = nominal[j] as number;
      let dc: number;
      const how = method[m] as Method;
      if (how === Method.Optical && isOpticalLayer(j)) dc = monitorLayer(j, scale, z1, z2, z3, z4, sink);
      else if (how === Method.Time)
        dc = d * (1 + (runErr[m] as number)) * (1 + (rateAr[m] as number)) * (1 + (layerA[m] as number) * z1) + (layerB[m] as number) * z2;
      else dc = d * (1 + (runErr[m] as number)) + d * (layerA[m] as number) * z1 + (layerB[m] as number) * z2;
      if (!(dc > 0)) dc = 0;
      controlled[j] = dc;
      if (anyOptical) deposit(j, dc, scale);
      thicknessOut[j] = dc * uPart;
    }
  }

  return {
    materials,
    hasIndexErrors,
    process,
    plan,
    sample(rng, seed, index, _nominal, thicknessOut, indexScaleOut) {
      run(rng, seed, index, thicknessOut, indexScaleOut);
    },
    traces(rng, seed, index, points = 120) {
      if (!Number.isInteger(points) || points < 2 || points > 10000)
        throw new RangeError(`points must be an integer in 2..10000, got ${points}`);
      const th = new Float64Array(L);
      const sc = new Float64Array(L);
      const sink: TraceSink = { traces: [], points };
      run(rng, seed, index, th, sc, sink);
      // the nominal curve on the nominal stack at the same thicknesses
      const nomTraces = nominalTraces(sink.traces);
      sink.traces.forEach((t, k) => {
        t.nominalValues = nomTraces[k] as number[];
      });
      return { traces: sink.traces, thicknesses: Array.from(th), indexScale: Array.from(sc) };
    },
  };

  function nominalTraces(traces: readonly MonitoringTrace[]): number[][] {
    const byLayer = new Map<number, MonitoringTrace>(traces.map((t) => [t.layer, t]));
    const out: number[][] = [];
    resetSlots(false);
    for (let j = 0; j < L; j++) {
      if (witnessEvery > 0 && j > 0 && j % witnessEvery === 0) resetSlots(true);
      const t = byLayer.get(j);
      if (t) {
        const sl = slots[slotOf[j] as number] as Slot;
        growthCurve(sl.v, sl.ns, sl.n[j] as number, sl.lambda, t.signal === "R", curve);
        out.push(t.thickness.map((d) => {
          const v = transmittanceAtTheta(curve, thetaOfThickness(curve, d));
          return t.signal === "R" ? 1 - v : v;
        }));
      }
      deposit(j, nominal[j] as number, 1);
    }
    return out;
  }
}

/**
 * The sampler a yield study uses: the process sampler when the error model carries a process, the
 * independent-error sampler otherwise (old error models keep their exact draws).
 */
export function createStudySampler(model: ErrorModel, design: Design): TrialSampler {
  return model.process
    ? createProcessSampler(model, design)
    : createTrialSampler(
        model,
        design.layers.map((l) => l.material),
      );
}
