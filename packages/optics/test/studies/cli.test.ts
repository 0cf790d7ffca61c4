// The CLI as users run it: a real tsx child process, real files in a temporary directory.
import { execFile } from "node:child_process";
import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runCli } from "../../src/cli/main.ts";

const pkg = fileURLToPath(new URL("../..", import.meta.url));
const example = join(pkg, "docs/examples/study-htw-ar4.json");
let dir = "";

function cli(args: string[], cwd = dir): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    execFile(
      process.execPath,
      ["--import", "tsx", join(pkg, "src/cli.ts"), ...args],
      { cwd: pkg, env: { ...process.env, INIT_CWD: cwd }, maxBuffer: 64 * 1024 * 1024 },
      (error, stdout, stderr) => resolve({ code: error ? Number(error.code ?? 1) : 0, stdout, stderr }),
    );
  });
}

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), "optics-cli-"));
  const study = JSON.parse(await readFile(example, "utf8")) as Record<string, unknown> & {
    errorModel: { thickness: Record<string, unknown> };
  };
  await writeFile(join(dir, "small.json"), JSON.stringify({ ...study, trials: 120 }));
  await writeFile(join(dir, "design.json"), JSON.stringify(study.design));
  await writeFile(join(dir, "broken.json"), '{ "trials": ');
  study.errorModel.thickness.relativePct = -2;
  await writeFile(join(dir, "negative.json"), JSON.stringify(study));
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe("optics CLI", { timeout: 60_000 }, () => {
  it("spectrum prints R, T, A per polarization and complex r, resolving files against INIT_CWD", async () => {
    const res = await cli([
      "spectrum",
      "design.json",
      "--from",
      "500",
      "--to",
      "510",
      "--step",
      "5",
      "--angle",
      "20",
    ]);
    expect(res.code).toBe(0);
    const out = JSON.parse(res.stdout) as {
      wavelengths: number[];
      s: { R: number[]; T: number[]; rRe: number[]; rIm: number[] };
      u: { R: number[] };
    };
    expect(out.wavelengths).toEqual([500, 505, 510]);
    // Lossless stack: R + T = 1 (energy conservation, Macleod)
    out.s.R.forEach((r, i) => expect(r + (out.s.T[i] as number)).toBeCloseTo(1, 9));
    // R = |r|²
    out.s.R.forEach((r, i) =>
      expect(r).toBeCloseTo((out.s.rRe[i] as number) ** 2 + (out.s.rIm[i] as number) ** 2, 12),
    );
  });

  it("yield with 2 worker threads prints exactly the single-thread result", async () => {
    const [one, two] = [
      await cli(["yield", "small.json"]),
      await cli(["yield", "small.json", "--workers", "2"]),
    ];
    expect(one.code).toBe(0);
    expect(two.code).toBe(0);
    expect(two.stdout).toBe(one.stdout);
    const result = JSON.parse(one.stdout) as { trials: number; seed: string; interval: { method: string } };
    expect(result.trials).toBe(120);
    expect(result.seed).toBe("HTW-AR4-rev-B");
    expect(result.interval.method).toBe("wilson");
  });

  // Spawned: the exit code and the single stderr line as a user sees them.
  it.concurrent.each([
    [["yield", "missing.json"], /^optics yield: study file not found: .*missing\.json$/],
    [["yield", "broken.json"], /^optics yield: study file .*broken\.json is not valid JSON/],
    [["yield", "negative.json"], /^optics yield: study\.errorModel\.thickness\.relativePct: .*got -2$/],
  ])("bad input %j exits 1 with one line", async (args, pattern) => {
    const res = await cli(args);
    expect(res.code).toBe(1);
    expect(res.stdout).toBe("");
    const lines = res.stderr.trimEnd().split("\n");
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(pattern);
  });

  // In process (same runCli the entry point calls), to keep the suite fast.
  it.each([
    [
      ["yield", "small.json", "--workers", "0"],
      /^optics yield: --workers: expected an integer in 1\.\.64, got 0$/,
    ],
    [
      ["spectrum", "design.json", "--step", "-1"],
      /^optics spectrum: --step: expected a step > 0 nm, got -1$/,
    ],
    [["spectrum", "small.json"], /^optics spectrum: design\.format: /],
    [["frobnicate"], /^optics frobnicate: unknown command/],
    [["spectrum", "design.json", "--colour", "red"], /^optics spectrum: unknown option --colour/],
  ])("bad input %j returns 1 with one line", async (args, pattern) => {
    const out: string[] = [];
    const err: string[] = [];
    const code = await runCli(args, { out: (t) => out.push(t), err: (t) => err.push(t), cwd: dir });
    expect(code).toBe(1);
    expect(out).toEqual([]);
    expect(err).toHaveLength(1);
    expect(err[0]).not.toContain("\n");
    expect(err[0]).toMatch(pattern);
  });
});
