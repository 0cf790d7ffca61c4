// Runs every vitest project once and prints "N passed, N failed" as the last line.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";

const report = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "stackproof-tests-")), "report.json");
const run = spawnSync(
  "pnpm",
  ["exec", "vitest", "run", "--reporter=default", "--reporter=json", `--outputFile.json=${report}`, ...process.argv.slice(2)],
  { stdio: "inherit", env: { ...process.env, CI: process.env.CI ?? "true" } },
);

let passed = 0;
let failed = 0;
if (fs.existsSync(report)) {
  const result = JSON.parse(fs.readFileSync(report, "utf8"));
  passed = result.numPassedTests ?? 0;
  failed = result.numFailedTests ?? 0;
  // A file that failed to load has no failed test of its own: count it as a failure.
  for (const file of result.testResults ?? []) {
    if (file.status === "failed" && (file.assertionResults ?? []).every((a) => a.status !== "failed")) failed += 1;
  }
} else {
  failed += 1;
  console.error("The test runner wrote no report.");
}
if (run.status !== 0 && failed === 0) failed = 1;

console.log(`${passed} passed, ${failed} failed`);
process.exit(failed > 0 || passed === 0 ? 1 : 0);
