// A real context on a temporary SQLite file, for supertest against createApp().
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { createApp } from "../../src/app.ts";
import { createContext, type AppContext } from "../../src/context.ts";
import { loadEnv } from "../../src/env.ts";
import { loadDemoData, type DemoSummary } from "../../src/demo/index.ts";

export interface TestServer {
  ctx: AppContext;
  app: ReturnType<typeof createApp>;
  dir: string;
  /** The demo workspace's summary when DEMO_DATA loaded it (as the entry point does), else null. */
  demo?: DemoSummary | null;
  close(): Promise<void>;
}

export async function createTestServer(overrides: Record<string, string> = {}): Promise<TestServer> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "stackproof-api-"));
  const env = loadEnv({
    NODE_ENV: "test",
    DATA_DIR: dir,
    DEMO_DATA: "false",
    YIELD_WORKERS: "1",
    // The origin the support agents send (support/auth.ts TEST_ORIGIN); allowed origins come from configuration.
    ALLOWED_ORIGINS: "http://stackproof.test",
    ...overrides,
  });
  const ctx = await createContext(env);
  const demo = await loadDemoData(env, ctx.db);
  const app = createApp(ctx);
  return {
    ctx,
    app,
    dir,
    demo,
    async close() {
      await ctx.close();
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
