import http from "node:http";
import fs from "node:fs";
import path from "node:path";
import os from "node:os";
// Serves the built page (vite build bench/browser --outDir <dir>) and reads window.__bench in Debian's chromium.
// Usage (repo root): apps/web/node_modules/.bin/vite build packages/optics/bench/browser --outDir /tmp/bench-browser
//   then: node packages/optics/bench/browser/run.mjs [trials] [workers] [dir]
import { createRequire } from "node:module";
const require = createRequire(new URL("../../../../tests/package.json", import.meta.url));
const { chromium } = require("playwright-core");
const root = process.argv[4] ?? "/tmp/bench-browser";
const srv = http.createServer((req, res) => {
  const p = path.join(root, decodeURIComponent(new URL(req.url, "http://x").pathname));
  const file = fs.existsSync(p) && fs.statSync(p).isFile() ? p : path.join(root, "index.html");
  res.setHeader("content-type", file.endsWith(".js") ? "text/javascript" : "text/html");
  res.end(fs.readFileSync(file));
});
await new Promise((r) => srv.listen(0, "127.0.0.1", r));
const port = srv.address().port;
const trials = Number(process.argv[2] ?? 10000);
const workers = Number(process.argv[3] ?? 2);
const profile = fs.mkdtempSync(path.join(os.tmpdir(), "bench-chromium-"));
const ctx = await chromium.launchPersistentContext(profile, { executablePath: "/usr/bin/chromium", headless: true, args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"] });
const page = ctx.pages()[0] ?? (await ctx.newPage());
page.on("pageerror", (e) => console.error("pageerror", String(e)));
await page.goto(`http://127.0.0.1:${port}/index.html?trials=${trials}&workers=${workers}`);
await page.waitForFunction(() => window.__bench, null, { timeout: 1_500_000, polling: 1000 });
console.log(JSON.stringify(await page.evaluate(() => window.__bench)));
await ctx.close();
fs.rmSync(profile, { recursive: true, force: true });
srv.close();
