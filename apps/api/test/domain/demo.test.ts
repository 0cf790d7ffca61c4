// The demo workspace: accounts and roles, the stories it tells, and that it is loaded only into a new database.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import zlib from "node:zlib";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createApp } from "../../src/app.ts";
import { createContext, type AppContext } from "../../src/context.ts";
import { loadEnv } from "../../src/env.ts";
import { DEMO_ACCOUNTS, DEMO_PASSWORD, loadDemoData, type DemoSummary } from "../../src/demo/index.ts";
import { demoPrograms } from "../../src/demo/designs.ts";
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

/**
 * The text of a pdfkit PDF: every content stream inflated, the hex strings of its TJ operators decoded (WinAnsi,
 * Latin-1 here) and joined; a wrapped line break becomes one space.
 */
function pdfText(bytes: Buffer): string {
  const raw = bytes.toString("latin1");
  const out: string[] = [];
  const streams = /stream\r?\n([\s\S]*?)\r?\nendstream/g;
  for (let m = streams.exec(raw); m; m = streams.exec(raw)) {
    let content: string;
    try {
      content = zlib.inflateSync(Buffer.from(m[1] as string, "latin1")).toString("latin1");
    } catch {
      continue;
    }
    for (const tj of content.matchAll(/\[([^\]]*)\] TJ/g))
      out.push(
        [...(tj[1] as string).matchAll(/<([0-9a-fA-F]*)>/g)]
          .map((h) => Buffer.from(h[1] as string, "hex").toString("latin1"))
          .join(""),
      );
  }
  return out.join(" ").replace(/\s+/g, " ");
}

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

  it("creates every review thread of the demo data, with its comments, author and resolution", () => {
    const expected = demoPrograms().flatMap((p) =>
      p.revisions.flatMap((r, i) =>
        (r.threads ?? []).map((t) => ({
          design: p.designName,
          revision: i + 1,
          anchor: JSON.stringify(t.anchor),
          severity: t.severity,
          status: t.resolvedBy ? "resolved" : "open",
          comments: t.comments.map((c) => c.body),
        })),
      ),
    );
    const rows = ctx.db.$client
      .prepare(
        "SELECT t.id, d.name AS design, t.revision_number AS revision, t.anchor, t.severity, t.status FROM threads t JOIN designs d ON d.id = t.design_id",
      )
      .all() as {
      id: string;
      design: string;
      revision: number;
      anchor: string;
      severity: string;
      status: string;
    }[];
    const stored = rows.map((r) => ({
      design: r.design,
      revision: r.revision,
      anchor: r.anchor,
      severity: r.severity,
      status: r.status,
      comments: (
        ctx.db.$client
          .prepare("SELECT body FROM comments WHERE thread_id = ? ORDER BY created_at")
          .all(r.id) as { body: string }[]
      ).map((c) => c.body),
    }));
    const key = (x: { design: string; revision: number; anchor: string }) =>
      `${x.design} ${x.revision} ${x.anchor}`;
    expect(stored.sort((a, b) => key(a).localeCompare(key(b)))).toEqual(
      expected.sort((a, b) => key(a).localeCompare(key(b))),
    );
  });

  it("states Kestrel's process in plain words at the gate, on the printed release record and in its PDF", async () => {
    const approver = await signIn(server, "approver@halvorsen.example", DEMO_PASSWORD);
    const overview = (await approver.get(`${API}/overview`).expect(200)).body.items as {
      design: { name: string };
      latestRevision: { id: string };
    }[];
    const id = overview.find((r) => r.design.name.startsWith("Kestrel"))?.latestRevision.id;
    // The wording of the optics package's describeProcess for Kestrel's run sheet (apps/api/src/demo/designs.ts):
    // cavities on turning points of the part's transmittance at 905 nm, blockers on the crystal.
    const words = [
      "SiO2, Ta2O5: optical monitoring (T), turning points at 905 nm on the part, 0.05 % photometric noise",
      "MgF2, ZrO2: quartz-crystal control, tooling error 0.5 %",
      "index drift 0.2 % per run",
    ];
    const gate = await approver.get(`${API}/revisions/${id}/gate`).expect(200);
    for (const w of words) expect(gate.body.evidence.errorModelText).toContain(w);
    await approver.post(`${API}/revisions/${id}/transitions`).send({ action: "approve" }).expect(200);
    const released = await approver
      .post(`${API}/revisions/${id}/transitions`)
      .send({ action: "release" })
      .expect(200);
    const releaseId = released.body.releaseId as string;
    const print = await approver.get(`${API}/releases/${releaseId}/print`).expect(200);
    for (const w of words) expect(print.text).toContain(w);
    // One spectrum panel per set of conditions, each with its own bands' limits (labelled by band id) and its own
    // caption: the cone and the field share 0° and "unpolarized" but not their conditions.
    const figures = print.text.split("<figure").slice(1);
    const panel = (caption: string) => {
      const found = figures.filter((f) => f.includes(`<figcaption>${caption}:`));
      expect(found, caption).toHaveLength(1);
      return found[0] as string;
    };
    const limits = (f: string) => [...f.matchAll(/fill="#b3261e">([^<]+)</g)].map((m) => m[1]).sort();
    expect(limits(panel("T (%), f/2 cone (14.48° half-angle) about 0°, unpolarized"))).toEqual(["pass-cone"]);
    expect(limits(panel("T (%), 0–10°, unpolarized"))).toEqual(["pass-field"]);
    const block0 = panel("T (%), 0°, unpolarized");
    expect(limits(block0)).toEqual(["block-long", "block-long-peak", "block-short", "block-short-peak"]);
    expect(limits(panel("T (%), 10°, unpolarized"))).toEqual(["block-long-10", "block-short-10"]);
    // the nominal curve is not drawn across the passband gap between the two blocking ranges: two pieces
    const nominalPath = /<path d="([^"]*)" fill="none" stroke="#1b1f1d"/.exec(block0)?.[1] ?? "";
    expect(nominalPath.match(/M/g)).toHaveLength(2);
    const pdf = await approver
      .get(`${API}/releases/${releaseId}/pdf`)
      .buffer(true)
      .parse((res, cb) => {
        const parts: Buffer[] = [];
        res.on("data", (c: Buffer) => parts.push(c));
        res.on("end", () => cb(null, Buffer.concat(parts)));
      })
      .expect(200);
    const text = pdfText(pdf.body as Buffer);
    for (const w of words) expect(text).toContain(w);
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
