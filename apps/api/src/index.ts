// Process entry: read configuration, open the database, listen.
import { createApp } from "./app.ts";
import { createContext } from "./context.ts";
import { loadEnv } from "./env.ts";

const env = loadEnv();
const ctx = await createContext(env);
const app = createApp(ctx);
const server = app.listen(env.PORT, env.HOST, () => {
  const address = server.address();
  const port = typeof address === "object" && address ? address.port : env.PORT;
  const url = env.PUBLIC_URL ?? `http://${env.HOST === "0.0.0.0" ? "localhost" : env.HOST}:${port}`;
  console.log(`\nStackproof is running: open ${url}\n`);
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
