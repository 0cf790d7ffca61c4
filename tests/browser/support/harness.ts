// Starts the built product (one process: API + web app) on a temporary database, and Debian's chromium.
import fs from "node:fs";
import os from "node:os";
import net from "node:net";
import path from "node:path";
import { spawn, type ChildProcess } from "node:child_process";
import { createRequire } from "node:module";
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { artifactsDir, CHROMIUM_PATH, repoRoot } from "./paths.ts";

export interface Product {
  url: string;
  dataDir: string;
  /** The server process (plain node on apps/api/dist/index.js). */
  process: ChildProcess;
  /** Everything the server printed so far. */
  output(): string;
  stop(): Promise<void>;
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const address = srv.address();
      const port = typeof address === "object" && address ? address.port : 0;
      srv.close(() => resolve(port));
    });
  });
}

async function waitForHealth(url: string, child: ChildProcess, log: () => string, timeoutMs = 60_000) {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (child.exitCode !== null) throw new Error(`The server exited (${child.exitCode}):\n${log()}`);
    try {
      const res = await fetch(`${url}/api/health`);
      if (res.ok) return;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`The server did not become healthy within ${timeoutMs} ms:\n${log()}`);
}

/** Starts the production build of Stackproof with a fresh database (demo data on unless `demo: false`). */
export async function startProduct(options: { demo?: boolean; env?: Record<string, string> } = {}): Promise<Product> {
  const port = await freePort();
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "stackproof-browser-"));
  let log = "";
  // The compiled server, started the way the README's start command starts it (plain node on dist/index.js).
  const child = spawn(process.execPath, ["dist/index.js"], {
    cwd: path.join(repoRoot, "apps/api"),
    env: {
      ...process.env,
      NODE_ENV: "production",
      HOST: "127.0.0.1",
      PORT: String(port),
      DATA_DIR: dataDir,
      DEMO_DATA: options.demo === false ? "false" : "true",
      // Production refuses to start without a mail server unless the local capture is asked for.
      MAIL_CAPTURE: "true",
      YIELD_WORKERS: "2",
      LOG_LEVEL: "warn",
      ...options.env,
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  child.stdout?.on("data", (d: Buffer) => (log += d.toString()));
  child.stderr?.on("data", (d: Buffer) => (log += d.toString()));
  const url = `http://127.0.0.1:${port}`;
  await waitForHealth(url, child, () => log);
  return {
    url,
    dataDir,
    process: child,
    output: () => log,
    async stop() {
      if (child.exitCode === null) {
        const exited = new Promise((r) => child.once("exit", r));
        child.kill("SIGTERM");
        await Promise.race([exited, new Promise((r) => setTimeout(r, 5000))]);
        if (child.exitCode === null) child.kill("SIGKILL");
      }
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

export interface BrowserSession {
  context: BrowserContext;
  page: Page;
  /** Console errors and uncaught page errors seen so far. */
  consoleErrors: string[];
  /** Saves a full-page PNG under tests/test-results/screenshots/<name>.png and returns its path. */
  screenshot(name: string, page?: Page): Promise<string>;
  close(): Promise<void>;
}

/** Launches headless Debian chromium with a fresh profile (never downloads a browser). */
export async function openBrowser(options: { width?: number; height?: number } = {}): Promise<BrowserSession> {
  if (!fs.existsSync(CHROMIUM_PATH)) {
    throw new Error(`Chromium not found at ${CHROMIUM_PATH}: install it with apt-get install -y chromium`);
  }
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), "stackproof-chromium-"));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM_PATH,
    headless: true,
    viewport: { width: options.width ?? 1280, height: options.height ?? 860 },
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
    ],
  });
  const consoleErrors: string[] = [];
  const watch = (p: Page) => {
    p.on("console", (msg) => {
      // A signed-out visitor's session probe answers 401 by design; every other console error counts.
      if (msg.type() === "error" && !/status of 401/.test(msg.text())) consoleErrors.push(msg.text());
    });
    p.on("pageerror", (err) => consoleErrors.push(String(err)));
  };
  context.pages().forEach(watch);
  context.on("page", watch);
  const page = context.pages()[0] ?? (await context.newPage());
  const shotsDir = path.join(artifactsDir, "screenshots");
  fs.mkdirSync(shotsDir, { recursive: true });
  return {
    context,
    page,
    consoleErrors,
    async screenshot(name, p = page) {
      const file = path.join(shotsDir, `${name}.png`);
      await p.screenshot({ path: file, fullPage: true });
      return file;
    },
    async close() {
      await context.close();
      fs.rmSync(profile, { recursive: true, force: true });
    },
  };
}

/** Signs in through the sign-in page and waits until the app shell shows. */
export async function signInAs(page: Page, baseUrl: string, email: string, password = "demo-quartz-lantern") {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel(/e-?mail/i).fill(email);
  await page.getByLabel(/password/i).fill(password);
  await page.getByRole("button", { name: /sign in/i }).click();
  await page.waitForURL((u) => !u.pathname.startsWith("/sign-in"), { timeout: 20_000 });
}

export const DEMO = {
  admin: "admin@halvorsen.example",
  designer: "designer@halvorsen.example",
  reviewer: "reviewer@halvorsen.example",
  approver: "approver@halvorsen.example",
  password: "demo-quartz-lantern",
} as const;

/**
 * The newest single-use link (`pathname`, e.g. "/reset-password") mailed to `to`, read from the capture store in the
 * product's database: the addressee's own inbox. The outbox page hides these links from everyone else.
 */
export function mailedLink(product: Product, to: string, pathname: string): URL {
  // better-sqlite3 is the API's dependency; load it from there rather than adding it to the test package.
  const Database = createRequire(path.join(repoRoot, "apps/api/package.json"))("better-sqlite3") as new (
    file: string,
    options: { readonly: boolean },
  ) => { prepare(sql: string): { all(...args: unknown[]): { text: string }[] }; close(): void };
  const db = new Database(path.join(product.dataDir, "stackproof.db"), { readonly: true });
  try {
    const rows = db.prepare("select text from captured_mail where lower(\"to\") = lower(?) order by received_at desc").all(to);
    for (const { text } of rows) {
      for (const m of text.matchAll(/https?:\/\/[^\s<>"]+/g)) {
        const url = new URL(m[0]);
        if (url.pathname === pathname) return url;
      }
    }
  } finally {
    db.close();
  }
  throw new Error(`No ${pathname} link mailed to ${to}`);
}
