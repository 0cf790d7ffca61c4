// Process entry: read configuration, open the database, load the demo data when asked, listen; SIGTERM/SIGINT drain
// and exit. The demo seeder is imported here only (imports go entry → demo → domain, never back).
import net from "node:net";
import { createApp } from "./app.ts";
import { createContext } from "./context.ts";
import { loadEnv } from "./env.ts";
import {
  DEMO_ACCOUNTS,
  DEMO_PASSWORD,
  DEMO_WORKSPACE,
  isDemoWorkspacePresent,
  loadDemoData,
} from "./demo/index.ts";

const env = loadEnv();
const ctx = await createContext(env);
// Demo data only into a new database (no workspace yet); its evidence runs are stored finished, so the job service
// (started with the context) has nothing of them to resume.
const demo = await loadDemoData(env, ctx.db);
const app = createApp(ctx);
const server = app.listen(env.PORT, env.HOST, () => {
  const address = server.address();
  const port = typeof address === "object" && address ? address.port : env.PORT;
  const url = env.PUBLIC_URL ?? `http://${env.HOST === "0.0.0.0" ? "localhost" : env.HOST}:${port}`;
  ctx.log.info(
    { url, port, compute: ctx.compute.mode, threads: ctx.compute.threads, pid: process.pid },
    "listening",
  );
  // The human-readable banner stays on stdout for whoever started the server by hand.
  console.log(`\nStackproof is running: open ${url}\n`);
  if (demo) {
    console.log(
      `Loaded the demo workspace "${DEMO_WORKSPACE}" (${demo.programs} programs, ${demo.revisions} revisions, ` +
        `${demo.yieldRuns} evidence runs${demo.cachedRuns ? `, ${demo.cachedRuns} of them from the demo evidence cache` : ""}, ` +
        `${demo.releases} release) in ${demo.ms} ms.`,
    );
  }
  if (env.DEMO_DATA && isDemoWorkspacePresent(ctx.db)) {
    console.log(`Demo accounts (demo only; password "${DEMO_PASSWORD}" for all):`);
    for (const a of DEMO_ACCOUNTS) console.log(`  ${a.email.padEnd(28)} ${a.name} — ${a.title}`);
    console.log("");
  }
  if (ctx.jobs.recovered.resumed.length || ctx.jobs.recovered.failed.length) {
    console.log(
      `Yield runs left by the previous process: ${ctx.jobs.recovered.resumed.length} resumed, ${ctx.jobs.recovered.failed.length} marked failed.`,
    );
  }
});
// A stopping server tells keep-alive clients to reconnect elsewhere instead of reusing a closing socket.
let closing = false;
server.on("request", (_req, res) => {
  if (closing) res.setHeader("Connection", "close");
});

// Stop accepting, let every request in flight finish (up to SHUTDOWN_GRACE_MS), then stop the job service
// (chunks in flight come back and are stored; unfinished runs resume in the next process), the pool's threads,
// mail and the database, and exit 0.
async function shutdown(signal: string) {
  if (closing) return;
  closing = true;
  const started = Date.now();
  ctx.log.info({ signal }, "shutting down: no new connections, draining requests in flight");
  // net.Server's close stops accepting but, unlike http.Server's, does not destroy "idle" connections (whose
  // request may be queued behind others or not parsed yet: they would get a reset). Responses from now on carry
  // "Connection: close"; keep-alive connections with nothing to do end by the server's keep-alive timeout (5 s).
  const drained = new Promise<void>((resolve) => net.Server.prototype.close.call(server, () => resolve()));
  const grace = setTimeout(() => {
    ctx.log.warn(
      { graceMs: env.SHUTDOWN_GRACE_MS },
      "requests still open after the grace period: closing them",
    );
    server.closeAllConnections();
  }, env.SHUTDOWN_GRACE_MS);
  grace.unref();
  await drained;
  clearTimeout(grace);
  try {
    await ctx.close();
  } catch (err) {
    ctx.log.error({ err }, "error while closing");
    process.exitCode = 1;
  }
  ctx.log.info({ ms: Date.now() - started }, "stopped");
  process.exit(process.exitCode ?? 0);
}
process.on("SIGINT", () => void shutdown("SIGINT"));
process.on("SIGTERM", () => void shutdown("SIGTERM"));
