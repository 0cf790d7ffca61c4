// The demo workspace: accounts and roles, the stories it tells, and that it is loaded only into a new database.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createApp } from "../../src/app.ts";
import { createContext, type AppContext } from "../../src/context.ts";
import { loadEnv } from "../../src/env.ts";
import { DEMO_ACCOUNTS, DEMO_PASSWORD, loadDemoData, type DemoSummary } from "../../src/demo/index.ts";
import { signIn } from "../support/auth.ts";
import type { TestServer } from "../support/context.ts";
import { API } from "./fixtures.ts";

let dir: string;
let ctx: AppContext;
let demo: DemoSummary | null;
let server: TestServer;
const env = () =>
  loadEnv({
    NODE_ENV: "test",
    DATA_DIR: dir,
    DEMO_DATA: "true",
    YIELD_WORKERS: "1",
    ALLOWED_ORIGINS: "http://stackproof.test",
  });

beforeAll(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "stackproof-demo-"));
  ctx = await createContext(env());
  // As the entry point (src/index.ts) does.
  demo = await loadDemoData(env(), ctx.db);
  server = { ctx, app: createApp(ctx), dir, demo, close: async () => {} };
});
afterAll(async () => {
  await ctx.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe("demo workspace", () => {
  it("has the four demo accounts with exactly their roles", async () => {
    expect(demo).toMatchObject({ programs: 4, yieldRuns: 3, releases: 1 });
    expect(demo?.ms).toBeLessThan(10000);
    for (const account of DEMO_ACCOUNTS) {
      const agent = await signIn(server, account.email, DEMO_PASSWORD);
      const me = await agent.get(`${API}/auth/me`).expect(200);
      expect(me.body).toMatchObject({
        user: { name: account.name },
        workspace: { name: "Halvorsen Thinfilm Works" },
        roles: account.roles,
      });
    }
  });

  it("tells its stories: a revision ready for decision, a blocking thread, a release, a protective program", async () => {
    const approver = await signIn(server, "approver@halvorsen.example", DEMO_PASSWORD);
    const overview = (await approver.get(`${API}/overview`).expect(200)).body.items as {
      design: { name: string };
      program: { protective: boolean };
      latestRevision: { id: string; status: string; number: number };
      latestVerifiedYield: { yield: number } | null;
      openBlockingThreads: number;
    }[];
    const by = (name: string) => overview.find((r) => r.design.name.startsWith(name));
    const kestrel = by("Kestrel");
    expect(kestrel?.latestRevision).toMatchObject({ status: "in_review", number: 2 });
    const gate = await approver.get(`${API}/revisions/${kestrel?.latestRevision.id}/gate`).expect(200);
    expect(gate.body.canApprove).toBe(true);
    expect(by("Aster")?.latestVerifiedYield?.yield).toBeLessThan(0.9);
    const merlin = by("Merlin");
    expect(merlin?.program.protective).toBe(true);
    expect(merlin?.openBlockingThreads).toBe(1);
    expect(merlin?.latestRevision.status).toBe("draft");
    const merlinThreads = await approver
      .get(`${API}/revisions/${merlin?.latestRevision.id}/threads`)
      .expect(200);
    expect(merlinThreads.body.items[0]).toMatchObject({
      revisionNumber: 1,
      severity: "blocking",
      status: "open",
    });
    expect(by("Wren")?.latestRevision.status).toBe("released");
    const releases = await approver.get(`${API}/releases`).expect(200);
    const record = await approver.get(`${API}/releases/${releases.body.items[0].id}`).expect(200);
    expect(record.body.decisions.map((d: { action: string }) => d.action)).toEqual([
      "submit",
      "approve",
      "release",
    ]);
    expect(record.body.yieldRun.verified).toBe(true);
    // the candidate passes its spec nominally
    const designer = await signIn(server, "designer@halvorsen.example", DEMO_PASSWORD);
    const nominal = await designer.get(`${API}/revisions/${kestrel?.latestRevision.id}`).expect(200);
    expect(nominal.body.nominal.pass).toBe(true);
  });

  it("is not loaded again into a database that has a workspace", async () => {
    await ctx.close();
    ctx = await createContext(env());
    const again = await loadDemoData(env(), ctx.db);
    server = { ctx, app: createApp(ctx), dir, demo: again, close: async () => {} };
    expect(again).toBeNull();
    const count = ctx.db.$client.prepare("SELECT count(*) AS n FROM workspaces").get() as { n: number };
    expect(count.n).toBe(1);
  });
});
