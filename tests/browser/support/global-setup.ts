// Before the integration suites: the browser must be installed and the built web app and server must be current.
import fs from "node:fs";
import path from "node:path";
import { execFileSync } from "node:child_process";
import { CHROMIUM_PATH, repoRoot } from "./paths.ts";

/** Newest modification time of any file under `dir` (0 when it does not exist). */
function newest(dir: string): number {
  if (!fs.existsSync(dir)) return 0;
  let latest = 0;
  for (const entry of fs.readdirSync(dir, { withFileTypes: true, recursive: true })) {
    if (!entry.isFile()) continue;
    latest = Math.max(latest, fs.statSync(path.join(entry.parentPath, entry.name)).mtimeMs);
  }
  return latest;
}

export default function setup(): void {
  if (!fs.existsSync(CHROMIUM_PATH)) {
    throw new Error(
      `Browser tests need Debian's chromium at ${CHROMIUM_PATH}. Install it with: apt-get install -y chromium ` +
        "(the README's test command does this when run as root).",
    );
  }
  const index = path.join(repoRoot, "apps/web/dist/index.html");
  const built = fs.existsSync(index) ? fs.statSync(index).mtimeMs : 0;
  const sources = Math.max(
    newest(path.join(repoRoot, "apps/web/src")),
    newest(path.join(repoRoot, "packages/optics/src")),
    newest(path.join(repoRoot, "packages/contracts/src")),
    fs.statSync(path.join(repoRoot, "apps/web/index.html")).mtimeMs,
  );
  // A stale build would test yesterday's app: rebuild when any source is newer than the build.
  if (sources > built) {
    execFileSync("pnpm", ["--filter", "@stackproof/web", "build"], { cwd: repoRoot, stdio: "inherit" });
  }
  // The suites run the compiled server (apps/api/dist), as production does: rebuild it when a source is newer.
  const server = path.join(repoRoot, "apps/api/dist/index.js");
  const serverBuilt = fs.existsSync(server) ? fs.statSync(server).mtimeMs : 0;
  const serverSources = Math.max(
    newest(path.join(repoRoot, "apps/api/src")),
    newest(path.join(repoRoot, "packages/optics/src")),
    newest(path.join(repoRoot, "packages/contracts/src")),
    fs.statSync(path.join(repoRoot, "apps/api/tsup.config.ts")).mtimeMs,
  );
  if (serverSources > serverBuilt) {
    execFileSync("pnpm", ["--filter", "@stackproof/api", "build"], { cwd: repoRoot, stdio: "inherit" });
  }
}
