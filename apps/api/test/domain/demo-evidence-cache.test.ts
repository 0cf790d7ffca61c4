// The demo's evidence cache: a cached run is the same run, bit for bit; anything that could make it another
// run (a changed input, a changed engine, a file someone else could have written) means computing it again.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import {
  mergeYieldChunks,
  planChunks,
  runYieldChunk,
  type YieldChunk,
  type YieldStudy,
} from "@stackproof/optics";
import { afterAll, describe, expect, it } from "vitest";
import { openDatabase, runMigrations } from "../../src/db/client.ts";
import { seedDemo } from "../../src/demo/index.ts";
import { demoPrograms } from "../../src/demo/designs.ts";
import { computeDemoEvidence, evidenceCacheKey, SPOT_TRIALS } from "../../src/demo/evidence-cache.ts";
import { revisionHash } from "../../src/domain/canonical.ts";
import { evidenceSeed } from "../../src/domain/evidence.ts";

const dirs: string[] = [];
const tempDir = (name: string) => {
  const d = fs.mkdtempSync(path.join(os.tmpdir(), `stackproof-${name}-`));
  dirs.push(d);
  return d;
};
afterAll(() => {
  for (const d of dirs) fs.rmSync(d, { recursive: true, force: true });
});

// A cheap study: the demo's Wren AR (3 layers) with 250 trials.
const wren = demoPrograms().find((p) => p.key === "wren");
if (!wren) throw new Error("no Wren demo program");
const study: YieldStudy = {
  design: (wren.revisions[1] as { stack: YieldStudy["design"] }).stack,
  mask: { ...wren.mask, protective: wren.protective },
  errorModel: wren.errorModel,
  trials: 250,
  seed: "cache-test",
};
const direct = (s: YieldStudy) =>
  mergeYieldChunks(
    s,
    planChunks(s.trials, 100).map(([a, c]) => runYieldChunk(s, a, c)),
  );
const entryFile = (dir: string, s: YieldStudy) => path.join(dir, `${evidenceCacheKey(s)}.json`);

describe("demo evidence cache", () => {
  it("a cached result is bit-identical to computing the study directly", () => {
    const dir = path.join(tempDir("cache"), "c");
    const fresh = computeDemoEvidence(study, dir);
    const again = computeDemoEvidence(study, dir);
    expect(fresh.cached).toBe(false);
    expect(again.cached).toBe(true);
    const expected = JSON.stringify(direct(study));
    expect(JSON.stringify(fresh.result)).toBe(expected);
    expect(JSON.stringify(again.result)).toBe(expected);
    // the directory is private to this user
    expect(fs.statSync(dir).mode & 0o077).toBe(0);
  });

  it("the key changes with every input that determines the result", () => {
    const base = evidenceCacheKey(study);
    const variants: YieldStudy[] = [
      { ...study, seed: "cache-test-2" },
      { ...study, trials: 251 },
      { ...study, errorModel: { ...study.errorModel, indexDriftPct: 0.1 } },
      { ...study, mask: { ...study.mask, protective: true } },
      { ...study, mask: { ...study.mask, bands: study.mask.bands.slice(1) } },
      {
        ...study,
        design: {
          ...study.design,
          layers: study.design.layers.map((l, i) => (i === 0 ? { ...l, thickness: l.thickness + 0.01 } : l)),
        },
      },
    ];
    const keys = new Set(variants.map(evidenceCacheKey));
    expect(keys.size).toBe(variants.length);
    expect(keys.has(base)).toBe(false);
  });

  it("an entry whose first trials differ from a recomputation (an engine change) is not used, and is replaced", () => {
    const dir = tempDir("cache");
    computeDemoEvidence(study, dir);
    const file = entryFile(dir, study);
    const entry = JSON.parse(fs.readFileSync(file, "utf8")) as { key: string; chunks: YieldChunk[] };
    const first = entry.chunks[0] as YieldChunk;
    expect(first.count).toBe(SPOT_TRIALS);
    first.worstMargins[0] = (first.worstMargins[0] as number) + 1e-9;
    // and a later chunk claims every trial passed
    const later = entry.chunks[1] as YieldChunk;
    later.passCount = later.count;
    fs.writeFileSync(file, JSON.stringify(entry));
    const out = computeDemoEvidence(study, dir);
    expect(out.cached).toBe(false);
    expect(JSON.stringify(out.result)).toBe(JSON.stringify(direct(study)));
    // replaced by the true entry: the next read is a hit again
    expect(computeDemoEvidence(study, dir).cached).toBe(true);
  });

  it("an entry under another key, or for other trials, is not used", () => {
    const dir = tempDir("cache");
    const other = { ...study, seed: "someone-else" };
    computeDemoEvidence(other, dir);
    // planted under this study's name
    fs.copyFileSync(entryFile(dir, other), entryFile(dir, study));
    const out = computeDemoEvidence(study, dir);
    expect(out.cached).toBe(false);
    expect(out.result.seed).toBe(study.seed);
    expect(JSON.stringify(out.result)).toBe(JSON.stringify(direct(study)));
  });

  it("a directory others can write to, or a symbolic link, is never read (planted results)", () => {
    const open = tempDir("cache-open");
    fs.chmodSync(open, 0o777);
    const privateDir = path.join(tempDir("cache"), "p");
    computeDemoEvidence(study, privateDir);
    // a true-looking entry with every trial passing, planted where anyone could have written it
    const entry = JSON.parse(fs.readFileSync(entryFile(privateDir, study), "utf8")) as {
      chunks: YieldChunk[];
    };
    for (const c of entry.chunks.slice(1)) {
      c.passCount = c.count;
      c.worstMargins = c.worstMargins.map((m) => Math.abs(m));
      c.bandFailures = c.bandFailures.map(() => 0);
    }
    fs.writeFileSync(entryFile(open, study), JSON.stringify(entry));
    const fromOpen = computeDemoEvidence(study, open);
    expect(fromOpen.cached).toBe(false);
    expect(fromOpen.result.passCount).toBe(direct(study).passCount);

    const link = path.join(tempDir("cache-link"), "link");
    fs.symlinkSync(privateDir, link);
    expect(computeDemoEvidence(study, link).cached).toBe(false);
  });

  it("with no cache directory nothing is written", () => {
    const out = computeDemoEvidence(study, null);
    expect(out.cached).toBe(false);
    expect(JSON.stringify(out.result)).toBe(JSON.stringify(direct(study)));
  });
});

describe("demo seeding through the cache", () => {
  it("a second seeding reads every evidence run from the cache and stores the same runs, with the server-assigned seeds", async () => {
    const cache = path.join(tempDir("seed-cache"), "c");
    const seedOnce = async () => {
      const dir = tempDir("seed-db");
      const db = openDatabase(path.join(dir, "demo.db"));
      runMigrations(db);
      const summary = await seedDemo(db, { evidenceCacheDir: cache });
      const runs = db.$client
        .prepare(
          "SELECT d.name AS design, r.number, y.seed, y.trials, y.kind, y.result FROM yield_runs y JOIN revisions r ON r.id = y.revision_id JOIN designs d ON d.id = r.design_id ORDER BY d.name",
        )
        .all() as {
        design: string;
        number: number;
        seed: string;
        trials: number;
        kind: string;
        result: string;
      }[];
      const revs = db.$client
        .prepare(
          "SELECT d.name AS design, r.number, r.hash FROM revisions r JOIN designs d ON d.id = r.design_id",
        )
        .all() as { design: string; number: number; hash: string }[];
      db.$client.close();
      return { summary, runs, revs };
    };
    const first = await seedOnce();
    const second = await seedOnce();
    expect(first.summary.cachedRuns).toBe(0);
    expect(second.summary.cachedRuns).toBe(first.summary.yieldRuns);
    expect(second.runs.map((r) => r.result)).toEqual(first.runs.map((r) => r.result));
    const programs = demoPrograms();
    for (const run of second.runs) {
      const p = programs.find((x) => x.designName === run.design);
      const rev = p?.revisions[run.number - 1];
      if (!p || !rev) throw new Error(`no demo revision for ${run.design} r${run.number}`);
      // the evidence rule: the seed from the revision's content hash and the error model, the program's minimum trials
      expect(run.kind).toBe("evidence");
      expect(run.trials).toBe(p.trials);
      expect(run.seed).toBe(evidenceSeed(revisionHash(rev.stack, p.mask), p.errorModel));
      expect(second.revs.find((r) => r.design === run.design && r.number === run.number)?.hash).toBe(
        revisionHash(rev.stack, p.mask),
      );
    }
  }, 120_000);
});
