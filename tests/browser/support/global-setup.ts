// Before the integration suites: the built web app must exist, and the browser must be installed.
import fs from "node:fs";
import path from "node:path";
import { execFileSync } from "node:child_process";
import { CHROMIUM_PATH, repoRoot } from "./paths.ts";

export default function setup(): void {
  if (!fs.existsSync(CHROMIUM_PATH)) {
    throw new Error(
      `Browser tests need Debian's chromium at ${CHROMIUM_PATH}. Install it with: apt-get install -y chromium ` +
        "(the README's test command does this when run as root).",
    );
  }
  const index = path.join(repoRoot, "apps/web/dist/index.html");
  if (!fs.existsSync(index)) {
    execFileSync("pnpm", ["--filter", "@stackproof/web", "build"], { cwd: repoRoot, stdio: "inherit" });
  }
}
