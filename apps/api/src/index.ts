// Process entry: read configuration, open the database, listen.
import { createApp } from "./app.ts";
import { createContext } from "./context.ts";
import { loadEnv } from "./env.ts";
import { DEMO_ACCOUNTS, DEMO_PASSWORD, DEMO_WORKSPACE, isDemoWorkspacePresent } from "./demo/index.ts";

const env = loadEnv();
const ctx = await createContext(env);
const app = createApp(ctx);
const server = app.listen(env.PORT, env.HOST, () => {
  const address = server.address();
  const port = typeof address === "object" && address ? address.port : env.PORT;
  const url = env.PUBLIC_URL ?? `http://${env.HOST === "0.0.0.0" ? "localhost" : env.HOST}:${port}`;
  console.log(`\nStackproof is running: open ${url}\n`);
  if (ctx.demo) {
    console.log(
      `Loaded the demo workspace "${DEMO_WORKSPACE}" (${ctx.demo.programs} programs, ${ctx.demo.revisions} revisions, ` +
        `${ctx.demo.yieldRuns} verified yield runs, ${ctx.demo.releases} release) in ${ctx.demo.ms} ms.`,
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

let closing = false;
async function shutdown(signal: string) {
  if (closing) return;
  closing = true;
  console.log(`${signal}: shutting down`);
  server.close();
  await ctx.close();
  process.exit(0);
}
process.on("SIGINT", () => void shutdown("SIGINT"));
process.on("SIGTERM", () => void shutdown("SIGTERM"));
