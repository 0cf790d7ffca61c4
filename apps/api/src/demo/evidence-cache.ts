// A small on-disk cache of the demo's evidence runs, so that seeding the demo (every browser suite and every
// start on a new database) does not redo the same Monte Carlo each time. Demo seeding only: verified runs of the
// product never read it.
//
// An entry is keyed by the sha-256 of everything that determines the result: stack, mask (with its protective
// flag), error model, seed, trials and the optics engine version (ENGINE_VERSION, which every yield result
// records; the optics package.json version is not exported and never changes). It holds the run's chunks
// (trial i's draws depend only on the seed and i, so chunks merge to the same result whatever their sizes), and
// the result is merged from them again on every read. A hit is spot-checked: the first SPOT_TRIALS trials are
// recomputed and must equal the cached first chunk, which catches an engine change made without a version bump.
// The cache lives in a directory of its own that only this user may write; any other directory, a file that
// does not parse or does not match its key, or any I/O error means: compute, and (when possible) write again.
import { createHash } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import {
  ENGINE_VERSION,
  mergeYieldChunks,
  planChunks,
  runYieldChunk,
  type YieldChunk,
  type YieldResult,
  type YieldStudy,
} from "@stackproof/optics";
import { canonicalJson } from "../domain/canonical.ts";

/** Trials recomputed on every cache hit (a few tens of ms for the demo's ~100-layer stack). */
export const SPOT_TRIALS = 8;
const CHUNK = 100;
const FORMAT = 1;

/** Default cache directory: per user under the system's temporary directory. */
export function defaultEvidenceCacheDir(): string {
  const uid = typeof process.getuid === "function" ? process.getuid() : "user";
  return path.join(os.tmpdir(), `stackproof-demo-evidence-${uid}`);
}

/** The cache key of a study: sha-256 hex of the canonical JSON of everything that determines its result. */
export function evidenceCacheKey(study: YieldStudy): string {
  return createHash("sha256")
    .update(
      canonicalJson({
        format: FORMAT,
        engine: ENGINE_VERSION,
        design: study.design,
        mask: study.mask,
        errorModel: study.errorModel,
        seed: study.seed,
        trials: study.trials,
      }),
    )
    .digest("hex");
}

/** Chunk plan: a first chunk of SPOT_TRIALS trials (the spot check), then chunks of 100. */
function plan(trials: number): [number, number][] {
  const first = Math.min(SPOT_TRIALS, trials);
  return [[0, first], ...planChunks(trials - first, CHUNK).map(([s, c]): [number, number] => [s + first, c])];
}

/** The directory, when it is a real directory owned by this user that nobody else can write; else null. */
function usableDir(dir: string): string | null {
  try {
    fs.mkdirSync(dir, { recursive: true, mode: 0o700 });
    const st = fs.lstatSync(dir);
    if (!st.isDirectory()) return null;
    if (typeof process.getuid === "function" && st.uid !== process.getuid()) return null;
    if ((st.mode & 0o022) !== 0) return null; // group- or world-writable: someone else could plant results
    return dir;
  } catch {
    return null;
  }
}

/** Every number finite (JSON would turn NaN and ±Infinity into null and change the merged result). */
function allFinite(value: unknown): boolean {
  let ok = true;
  JSON.stringify(value, (_k, v: unknown) => {
    if (typeof v === "number" && !Number.isFinite(v)) ok = false;
    return v;
  });
  return ok;
}

function readChunks(file: string, key: string, study: YieldStudy): YieldChunk[] | null {
  try {
    const st = fs.lstatSync(file);
    if (!st.isFile()) return null;
    const entry = JSON.parse(fs.readFileSync(file, "utf8")) as { key?: unknown; chunks?: unknown };
    if (entry.key !== key || !Array.isArray(entry.chunks)) return null;
    const chunks = entry.chunks as YieldChunk[];
    const expected = plan(study.trials);
    if (chunks.length !== expected.length) return null;
    for (let i = 0; i < chunks.length; i++) {
      const c = chunks[i] as YieldChunk;
      const [start, count] = expected[i] as [number, number];
      if (c.seed !== study.seed || c.trials !== study.trials || c.startTrial !== start || c.count !== count)
        return null;
    }
    return chunks;
  } catch {
    return null;
  }
}

/** Outcome of {@link computeDemoEvidence}, for the seeding summary and the tests. */
export interface DemoEvidence {
  result: YieldResult;
  /** True when the chunks came from the cache (and passed the spot check). */
  cached: boolean;
}

/**
 * The yield result of a demo evidence study: from the cache when a valid entry exists, else computed (and
 * stored). The result is identical to merging freshly computed chunks of the same study.
 * @param cacheDir the cache directory, or null for no cache
 */
export function computeDemoEvidence(study: YieldStudy, cacheDir: string | null): DemoEvidence {
  const dir = cacheDir === null ? null : usableDir(cacheDir);
  const key = evidenceCacheKey(study);
  const file = dir ? path.join(dir, `${key}.json`) : null;
  const chunksPlan = plan(study.trials);
  const [spotStart, spotCount] = chunksPlan[0] as [number, number];
  const spot = runYieldChunk(study, spotStart, spotCount);
  const cached = file ? readChunks(file, key, study) : null;
  if (cached && JSON.stringify(cached[0]) === JSON.stringify(spot)) {
    try {
      return { result: mergeYieldChunks(study, cached), cached: true };
    } catch {
      // a cached chunk that does not fit this study: compute below
    }
  }
  const chunks = [spot, ...chunksPlan.slice(1).map(([s, c]) => runYieldChunk(study, s, c))];
  const result = mergeYieldChunks(study, chunks);
  if (file && allFinite(chunks)) {
    try {
      const tmp = `${file}.${process.pid}.tmp`;
      fs.writeFileSync(tmp, JSON.stringify({ key, chunks }), { mode: 0o600 });
      fs.renameSync(tmp, file);
    } catch {
      // a full or read-only disk only costs the next seeding its time
    }
  }
  return { result, cached: false };
}
