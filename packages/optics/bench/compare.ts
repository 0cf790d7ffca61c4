/**
 * Side-by-side kernel throughput: the scalar C reference kernel (built from the shared bench
 * folder, `<repo root>/../shared/bench/tmm-c`) against the TypeScript kernel, same workload
 * and modes, alternating runs on the same machine. Shared machines drift by tens of percent,
 * so each side is run `rounds` times, alternating, and the best round of each is compared.
 *
 * Usage: tsx bench/compare.ts [trials layers wavelengths reps rounds]
 */
import { execFileSync } from "node:child_process";
import { existsSync } from "node:fs";
import { dirname, resolve } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { readFileSync } from "node:fs";
import { computeSpectrum, parseDesign, type Material } from "../src/core/index.ts";
import { runKernelBenchmark, type KernelBenchRow } from "./kernel.ts";

/** Options of {@link runComparison}. */
export interface ComparisonOptions {
  trials?: number;
  layers?: number;
  wavelengths?: number;
  reps?: number;
  /** alternating C/TS rounds; the best round of each side is reported (default 2) */
  rounds?: number;
  /** folder to build the C kernel into (default /tmp/tmm-c) */
  buildDir?: string;
  /** repository root (default: three levels above this file) */
  repoRoot?: string;
}

/** Parsed per-mode result of one side. */
export interface ComparisonRow {
  mode: string;
  cEvalsPerSecond: number | undefined;
  tsEvalsPerSecond: number;
  /** TS / C throughput */
  ratio: number | undefined;
  /** largest |R_TS − R_C| and |T_TS − T_C| over trial 0 of the C run (both polarizations) */
  maxDeviation: number | undefined;
}

/**
 * Recompute the cases the C kernel dumps (trial 0 of every mode: layer constants, thicknesses,
 * R and T per wavelength) with computeSpectrum and return the largest deviation per mode.
 */
export function checkAgainstDump(text: string): Map<string, number> {
  const lines = text.split("\n");
  const out = new Map<string, number>();
  let i = 0;
  while (i < lines.length) {
    const head = lines[i]!.split(" ");
    i++;
    if (head[0] !== "case") continue;
    const [, name, Ls, Ws, th, pol, nInc, nSub] = head as [string, string, string, string, string, string, string, string];
    const L = Number(Ls);
    const W = Number(Ws);
    const materials: Material[] = [
      { id: "inc", name: "inc", model: { kind: "constant", n: Number(nInc), k: 0 }, role: "medium", source: "C dump" },
      { id: "sub", name: "sub", model: { kind: "constant", n: Number(nSub), k: 0 }, role: "substrate", source: "C dump" },
    ];
    const layers: { material: string; thickness: number }[] = [];
    for (let j = 0; j < L; j++, i++) {
      const [, A, B, k, d] = lines[i]!.split(" ").map(Number) as [number, number, number, number, number];
      materials.push({ id: `c${j}`, name: `c${j}`, model: { kind: "cauchy", A, B, C: 0, k }, role: "layer", source: "C dump" });
      layers.push({ material: `c${j}`, thickness: d });
    }
    const wl: number[] = [];
    const R: number[] = [];
    const T: number[] = [];
    for (let w = 0; w < W; w++, i++) {
      const [, lam, r, t] = lines[i]!.split(" ").map(Number) as [number, number, number, number];
      wl.push(lam);
      R.push(r);
      T.push(t);
    }
    const design = parseDesign({
      format: "stackproof.design/v1",
      name: `C case ${name}`,
      referenceWavelength: 550,
      incident: "inc",
      layers: layers.reverse(), // the C kernel lists layers from the incident side
      substrate: { material: "sub", thicknessMm: 1, backside: false },
      exit: "inc",
      materials,
    });
    const sp = computeSpectrum(design, { wavelengths: wl, angleDeg: Number(th) });
    const resp = pol === "p" ? sp.p : sp.s;
    let dev = out.get(name) ?? 0;
    for (let w = 0; w < W; w++) {
      dev = Math.max(dev, Math.abs(resp.R[w]! - R[w]!), Math.abs(resp.T[w]! - T[w]!));
    }
    out.set(name, dev);
  }
  return out;
}

const here = dirname(fileURLToPath(import.meta.url));

/** Location of the shared C kernel relative to the repository root. */
export function cKernelDir(repoRoot = resolve(here, "../../..")): string {
  return resolve(repoRoot, "../shared/bench/tmm-c");
}

function parseC(text: string): Map<string, number> {
  const out = new Map<string, number>();
  for (const line of text.split("\n")) {
    const m = /^(\S+)\s+pols=\S+\s.*median\s+([0-9.eE+-]+)\s+layer-wavelength/.exec(line);
    if (m) out.set(m[1]!, Number(m[2]));
  }
  return out;
}

/** Run both kernels and return the rows (C side undefined when the shared folder is absent). */
export function compareKernels(options: ComparisonOptions = {}): { rows: ComparisonRow[]; note: string } {
  const M = options.trials ?? 2000;
  const L = options.layers ?? 40;
  const W = options.wavelengths ?? 400;
  const reps = options.reps ?? 3;
  const rounds = Math.max(1, options.rounds ?? 2);
  const dir = cKernelDir(options.repoRoot);
  const buildDir = options.buildDir ?? "/tmp/tmm-c";
  let note = "";
  let cBin: string | undefined;
  if (existsSync(resolve(dir, "build.sh"))) {
    execFileSync("sh", [resolve(dir, "build.sh"), buildDir], { stdio: "pipe" });
    cBin = resolve(buildDir, "tmm_bench");
  } else {
    note = `C reference kernel not found at ${dir}: TypeScript figures only`;
  }
  const bestC = new Map<string, number>();
  const bestTs = new Map<string, number>();
  let deviation = new Map<string, number>();
  const runC = (r: number): void => {
    if (!cBin) return;
    const args = [String(M), String(L), String(W), String(reps)];
    const dumpFile = resolve(buildDir, "dump.txt");
    if (r === 0) args.push("--dump", dumpFile);
    const text = execFileSync(cBin, args, { encoding: "utf8" });
    if (r === 0) deviation = checkAgainstDump(readFileSync(dumpFile, "utf8"));
    for (const [mode, v] of parseC(text)) bestC.set(mode, Math.max(bestC.get(mode) ?? 0, v));
  };
  const runTs = (): void => {
    const ts: KernelBenchRow[] = runKernelBenchmark({ trials: M, layers: L, wavelengths: W, reps });
    for (const row of ts) bestTs.set(row.mode, Math.max(bestTs.get(row.mode) ?? 0, row.evalsPerSecond));
  };
  // alternate which side goes first, so a load change within a round does not favour one side
  for (let r = 0; r < rounds; r++) {
    if (r % 2 === 0) {
      runC(r);
      runTs();
    } else {
      runTs();
      runC(r);
    }
  }
  const rows: ComparisonRow[] = [...bestTs].map(([mode, tsv]) => {
    const c = bestC.get(mode);
    return { mode, cEvalsPerSecond: c, tsEvalsPerSecond: tsv, ratio: c ? tsv / c : undefined, maxDeviation: deviation.get(mode) };
  });
  return { rows, note };
}

/** Printable comparison table (layer-wavelength evaluations per second, TS / C ratio). */
export async function runComparison(options: ComparisonOptions = {}): Promise<string> {
  const { rows, note } = compareKernels(options);
  const M = options.trials ?? 2000;
  const L = options.layers ?? 40;
  const W = options.wavelengths ?? 400;
  const fmt = (v: number | undefined): string => (v === undefined ? "—" : v.toExponential(3));
  const lines = [
    `kernel throughput, ${M} trials × ${L} layers × ${W} wavelengths, layer-wavelength evaluations per second (best round)`,
    `${"mode".padEnd(18)} ${"C (gcc -O3)".padStart(12)} ${"TypeScript".padStart(12)} ${"TS/C".padStart(6)} ${"max |ΔR|,|ΔT|".padStart(15)}`,
    ...rows.map(
      (r) =>
        `${r.mode.padEnd(18)} ${fmt(r.cEvalsPerSecond).padStart(12)} ${fmt(r.tsEvalsPerSecond).padStart(12)} ${(r.ratio === undefined ? "—" : r.ratio.toFixed(2)).padStart(6)} ${(r.maxDeviation === undefined ? "—" : r.maxDeviation.toExponential(1)).padStart(15)}`,
    ),
  ];
  if (note) lines.push(note);
  return lines.join("\n");
}

if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  const [M, L, W, reps, rounds] = process.argv.slice(2).map(Number);
  const opts: ComparisonOptions = {};
  if (M) opts.trials = M;
  if (L) opts.layers = L;
  if (W) opts.wavelengths = W;
  if (reps) opts.reps = reps;
  if (rounds) opts.rounds = rounds;
  runComparison(opts).then(
    (table) => process.stdout.write(table + "\n"),
    (e: unknown) => {
      process.stderr.write(String(e) + "\n");
      process.exitCode = 1;
    },
  );
}
