// Cross-check against the shared scalar C reference kernel (skipped when it is not present).
import { execFileSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { describe, expect, it } from "vitest";
import { cKernelDir, checkAgainstDump } from "../../bench/compare.ts";

const dir = cKernelDir();
const haveC = existsSync(resolve(dir, "build.sh")) && existsSync("/usr/bin/gcc");

describe.skipIf(!haveC)("C reference kernel (tmm-c)", () => {
  it("computeSpectrum reproduces its R and T for every mode to 1e-12", () => {
    // independent implementation of the same characteristic-matrix method (shared bench tmm-c)
    const out = mkdtempSync(join(tmpdir(), "tmm-c-"));
    try {
      execFileSync("sh", [resolve(dir, "build.sh"), out], { stdio: "pipe" });
      const dump = join(out, "dump.txt");
      execFileSync(join(out, "tmm_bench"), ["1", "40", "200", "1", "--dump", dump], { stdio: "pipe" });
      const dev = checkAgainstDump(readFileSync(dump, "utf8"));
      expect([...dev.keys()].sort()).toEqual(["abs-full", "abs-oblique", "lossless-normal", "lossless-oblique"]);
      for (const v of dev.values()) expect(v).toBeLessThan(1e-12);
    } finally {
      rmSync(out, { recursive: true, force: true });
    }
  }, 30_000);
});
