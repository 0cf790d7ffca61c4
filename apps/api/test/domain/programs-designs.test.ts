// Programs, designs, revisions (immutability, content hash), diffs, design import, overview and queue.
import { createHash } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { createTestServer, type TestServer } from "../support/context.ts";
import { signedInMember } from "../support/auth.ts";
import { canonicalJson } from "../../src/domain/canonical.ts";
import {
  API,
  AR_MASK,
  createDesign,
  createProgram,
  createTeam,
  programBody,
  rawDesign,
  singleLayerAr,
  twoLayerAr,
  type Team,
} from "./fixtures.ts";

let server: TestServer;
let team: Team;
beforeAll(async () => {
  server = await createTestServer();
  team = await createTeam(server);
});
afterAll(async () => {
  await server.close();
});

describe("programs", () => {
  it("creates, lists, reads and edits a program (admin or approver)", async () => {
    const created = await team.members.admin.agent
      .post(`${API}/programs`)
      .send(programBody({ name: "Created by admin" }))
      .expect(201);
    expect(created.body).toMatchObject({
      name: "Created by admin",
      targetYield: 0.8,
      protective: false,
      studyDefaults: { trials: 120, seed: "test-seed" },
    });
    const list = await team.members.reviewer.agent.get(`${API}/programs`).expect(200);
    expect(list.body.items.map((p: { id: string }) => p.id)).toContain(created.body.id);
    const one = await team.members.designer.agent.get(`${API}/programs/${created.body.id}`).expect(200);
    expect(one.body.designs).toEqual([]);
    const patched = await team.members.approver.agent
      .patch(`${API}/programs/${created.body.id}`)
      .send({ targetYield: 0.95, protective: true })
      .expect(200);
    expect(patched.body).toMatchObject({ targetYield: 0.95, protective: true });
  });

  it("refuses without a session (401), for a designer (403), for an unknown id (404), and bad input (400)", async () => {
    await request(server.app).get(`${API}/programs`).expect(401);
    const denied = await team.members.designer.agent.post(`${API}/programs`).send(programBody()).expect(403);
    expect(denied.body.error.code).toBe("forbidden");
    await team.members.reviewer.agent.patch(`${API}/programs/x`).send({ targetYield: 0.5 }).expect(403);
    await team.members.approver.agent.get(`${API}/programs/does-not-exist`).expect(404);
    await team.members.approver.agent
      .patch(`${API}/programs/does-not-exist`)
      .send({ targetYield: 0.5 })
      .expect(404);
    const bad = await team.members.approver.agent
      .post(`${API}/programs`)
      .send(programBody({ targetYield: 1.5 }))
      .expect(400);
    expect(bad.body.error.code).toBe("validation_failed");
    await team.members.approver.agent
      .post(`${API}/programs`)
      .send(programBody({ specMask: { bands: [] } }))
      .expect(400);
  });

  it("pages the program list newest first", async () => {
    await createProgram(team, { name: "Page A" });
    await createProgram(team, { name: "Page B" });
    const first = await team.members.reviewer.agent.get(`${API}/programs?limit=1`).expect(200);
    expect(first.body.items).toHaveLength(1);
    expect(first.body.items[0].name).toBe("Page B");
    expect(first.body.nextCursor).toEqual(expect.any(String));
    const second = await team.members.reviewer.agent
      .get(`${API}/programs?limit=1&cursor=${first.body.nextCursor}`)
      .expect(200);
    expect(second.body.items[0].name).toBe("Page A");
    await team.members.reviewer.agent.get(`${API}/programs?cursor=garbage`).expect(400);
  });

  it("hides programs of another workspace (404)", async () => {
    const program = await createProgram(team);
    const outsider = await signedInMember(server, { roles: ["approver"] });
    await outsider.agent.get(`${API}/programs/${program.id}`).expect(404);
    const list = await outsider.agent.get(`${API}/programs`).expect(200);
    expect(list.body.items).toEqual([]);
  });
});

describe("designs and revisions", () => {
  it("creates a design with revision 1 and a content hash of the canonical stack and mask", async () => {
    const program = await createProgram(team);
    const { design, revision } = await createDesign(team, program.id);
    expect(revision).toMatchObject({ number: 1, status: "draft" });
    const full = await team.members.reviewer.agent.get(`${API}/revisions/${revision.id}`).expect(200);
    const expected = createHash("sha256")
      .update(canonicalJson({ stack: full.body.stack, specMask: AR_MASK }))
      .digest("hex");
    expect(full.body.hash).toBe(expected);
    expect(full.body.nominal.pass).toBe(true);
    expect(full.body.nominal.bands.map((b: { id: string }) => b.id)).toEqual(["avg", "peak"]);
    // Macleod, single-layer AR: quarter-wave n = 1.38 on n = 1.52 gives about 1.26 % at the reference wavelength.
    const avg = full.body.nominal.bands.find((b: { id: string }) => b.id === "avg");
    expect(avg.average).toBeGreaterThan(1);
    expect(avg.average).toBeLessThan(2);
    const view = await team.members.designer.agent.get(`${API}/designs/${design.id}`).expect(200);
    expect(view.body.revisions).toHaveLength(1);
    expect(view.body.program.id).toBe(program.id);
  });

  it("adds revisions with the next number; the same content gives the same hash", async () => {
    const program = await createProgram(team);
    const { design, revision } = await createDesign(team, program.id);
    const r2 = await team.members.designer2.agent
      .post(`${API}/designs/${design.id}/revisions`)
      .send({ baseRevisionId: revision.id, stack: singleLayerAr(), note: "same" })
      .expect(201);
    expect(r2.body.number).toBe(2);
    expect(r2.body.hash).toBe(revision.hash);
    expect(r2.body.author.name).toBe("Oskar Lind");
    const r3 = await team.members.designer.agent
      .post(`${API}/designs/${design.id}/revisions`)
      .send({ baseRevisionId: r2.body.id, stack: twoLayerAr(), note: "two layers" })
      .expect(201);
    expect(r3.body.number).toBe(3);
    expect(r3.body.hash).not.toBe(revision.hash);
    const view = await team.members.designer.agent.get(`${API}/designs/${design.id}`).expect(200);
    expect(view.body.revisions.map((r: { number: number }) => r.number)).toEqual([3, 2, 1]);
  });

  it("refuses invalid stacks (400 with the field), reviewers (403), unknown designs (404)", async () => {
    const program = await createProgram(team);
    const bad = await team.members.designer.agent
      .post(`${API}/programs/${program.id}/designs`)
      .send({ name: "bad", stack: rawDesign([{ material: "MgF2", thickness: -5 }]) })
      .expect(400);
    expect(bad.body.error.code).toBe("invalid_design");
    expect(bad.body.error.message).toContain("layers[0].thickness");
    const unknown = await team.members.designer.agent
      .post(`${API}/programs/${program.id}/designs`)
      .send({ name: "bad", stack: rawDesign([{ material: "unobtainium", thickness: 100 }]) })
      .expect(400);
    expect(unknown.body.error.message).toContain("unobtainium");
    await team.members.reviewer.agent
      .post(`${API}/programs/${program.id}/designs`)
      .send({ name: "x", stack: singleLayerAr() })
      .expect(403);
    await team.members.designer.agent
      .post(`${API}/designs/nope/revisions`)
      .send({ baseRevisionId: "nope", stack: singleLayerAr() })
      .expect(404);
    await team.members.designer.agent.get(`${API}/designs/nope`).expect(404);
    await team.members.designer.agent.get(`${API}/revisions/nope`).expect(404);
    await request(server.app).get(`${API}/designs/nope`).expect(401);
  });

  it("diffs two revisions layer by layer, aligned by index", async () => {
    const program = await createProgram(team);
    const { design, revision } = await createDesign(team, program.id);
    const r2 = await team.members.designer.agent
      .post(`${API}/designs/${design.id}/revisions`)
      .send({ baseRevisionId: revision.id, stack: twoLayerAr() })
      .expect(201);
    const diff = await team.members.reviewer.agent
      .get(`${API}/revisions/${r2.body.id}/diff?against=${revision.id}`)
      .expect(200);
    // index 0: MgF2 → Al2O3 (changed, material), index 1: MgF2 added
    expect(diff.body.changed).toHaveLength(1);
    expect(diff.body.changed[0]).toMatchObject({ index: 0, materialChanged: true });
    expect(diff.body.added).toHaveLength(1);
    expect(diff.body.added[0].index).toBe(1);
    expect(diff.body.removed).toEqual([]);
    expect(diff.body.summary).toContain("1 layer changed");
    const back = await team.members.reviewer.agent
      .get(`${API}/revisions/${revision.id}/diff?against=${r2.body.id}`)
      .expect(200);
    expect(back.body.removed).toHaveLength(1);
    const thicker = singleLayerAr();
    const layer = thicker.layers[0];
    if (!layer) throw new Error("no layer");
    layer.thickness += 2.5;
    const r3 = await team.members.designer.agent
      .post(`${API}/designs/${design.id}/revisions`)
      .send({ baseRevisionId: r2.body.id, stack: thicker })
      .expect(201);
    const delta = await team.members.reviewer.agent
      .get(`${API}/revisions/${r3.body.id}/diff?against=${revision.id}`)
      .expect(200);
    expect(delta.body.changed[0]).toMatchObject({ index: 0, deltaNm: 2.5, materialChanged: false });
    await team.members.reviewer.agent.get(`${API}/revisions/${r3.body.id}/diff`).expect(400);
    await team.members.reviewer.agent.get(`${API}/revisions/${r3.body.id}/diff?against=nope`).expect(404);
  });
});

describe("design import", () => {
  it("parses a CSV layer list into a design, storing nothing", async () => {
    const before = server.ctx.db.$client.prepare("SELECT count(*) AS n FROM revisions").get() as {
      n: number;
    };
    const csv = "material,thickness_nm,locked\nAl2O3,84.1,false\nZrO2,129.5,true\nMgF2,99.6,\n";
    const res = await team.members.designer.agent
      .post(`${API}/imports/design`)
      .field("referenceWavelength", "530")
      .field("substrate", "boro-crown")
      .attach("file", Buffer.from(csv), "window.csv")
      .expect(200);
    expect(res.body.stack.layers).toEqual([
      { material: "Al2O3", thickness: 84.1, locked: false },
      { material: "ZrO2", thickness: 129.5, locked: true },
      { material: "MgF2", thickness: 99.6, locked: false },
    ]);
    expect(res.body.stack.name).toBe("window");
    expect(res.body.warnings.some((w: string) => w.includes("deposition order"))).toBe(true);
    const after = server.ctx.db.$client.prepare("SELECT count(*) AS n FROM revisions").get() as { n: number };
    expect(after.n).toBe(before.n);
  });

  it("parses a JSON design file", async () => {
    const res = await team.members.designer.agent
      .post(`${API}/imports/design`)
      .attach("file", Buffer.from(JSON.stringify(singleLayerAr("From JSON"))), "design.json")
      .expect(200);
    expect(res.body.stack.name).toBe("From JSON");
    expect(res.body.warnings).toEqual([]);
  });

  it("names the row and column of a bad cell, refuses wrong columns, binary and oversize files", async () => {
    const agent = team.members.designer.agent;
    const cell = await agent
      .post(`${API}/imports/design`)
      .attach("file", Buffer.from("material,thickness_nm\nMgF2,99\nZrO2,abc\n"), "x.csv")
      .expect(422);
    expect(cell.body.error.details).toEqual([
      { row: 3, column: "thickness_nm", message: 'expected a number, got "abc"' },
    ]);
    const cols = await agent
      .post(`${API}/imports/design`)
      .attach("file", Buffer.from("mat,thick\nMgF2,99\n"), "x.csv")
      .expect(422);
    expect(cols.body.error.details[0]).toMatchObject({ row: 1 });
    expect(cols.body.error.details.map((d: { column: string }) => d.column)).toEqual(
      expect.arrayContaining(["material", "thickness_nm"]),
    );
    const mat = await agent
      .post(`${API}/imports/design`)
      .attach("file", Buffer.from("material,thickness_nm\nkryptonite,10\n"), "x.csv")
      .expect(422);
    expect(mat.body.error.details[0]).toMatchObject({ row: 2, column: "material" });
    const bin = await agent
      .post(`${API}/imports/design`)
      .attach("file", Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x00, 0x01]), "x.png")
      .expect(415);
    expect(bin.body.error.code).toBe("binary_file");
    const latin1 = await agent
      .post(`${API}/imports/design`)
      .attach("file", Buffer.from([0x6d, 0x61, 0xe9, 0x0a]), "x.csv")
      .expect(415);
    expect(latin1.body.error.code).toBe("binary_file");
    const big = await agent
      .post(`${API}/imports/design`)
      .attach("file", Buffer.alloc(1024 * 1024 + 10, "a"), "big.csv")
      .expect(413);
    expect(big.body.error.code).toBe("payload_too_large");
    const json = await agent
      .post(`${API}/imports/design`)
      .attach("file", Buffer.from("{ not json"), "x.json")
      .expect(400);
    expect(json.body.error.code).toBe("malformed_json");
    await agent.post(`${API}/imports/design`).expect(400);
    await team.members.reviewer.agent
      .post(`${API}/imports/design`)
      .attach("file", Buffer.from("material,thickness_nm\nMgF2,99\n"), "x.csv")
      .expect(403);
    await request(server.app).post(`${API}/imports/design`).expect(401);
  });
});

describe("overview and queue", () => {
  it("lists one row per design with the latest revision and thread counts", async () => {
    const program = await createProgram(team, { name: "Overview program" });
    const { design } = await createDesign(team, program.id);
    const res = await team.members.reviewer.agent.get(`${API}/overview`).expect(200);
    const row = res.body.items.find((r: { design: { id: string } }) => r.design.id === design.id);
    expect(row).toMatchObject({
      program: { id: program.id, name: "Overview program", targetYield: 0.8, protective: false },
      latestRevision: { number: 1, status: "draft", authorName: "Ilse Varga" },
      latestVerifiedYield: null,
      openBlockingThreads: 0,
      openThreads: 0,
    });
    await request(server.app).get(`${API}/overview`).expect(401);
  });

  it("fills the queue by role", async () => {
    const program = await createProgram(team);
    const { revision } = await createDesign(team, program.id);
    await team.members.designer.agent
      .post(`${API}/revisions/${revision.id}/transitions`)
      .send({ action: "submit" })
      .expect(200);
    const reviewer = await team.members.reviewer.agent.get(`${API}/queue`).expect(200);
    expect(reviewer.body.reviewRequested.map((r: { id: string }) => r.id)).toContain(revision.id);
    expect(reviewer.body.readyForRelease).toEqual([]);
    const designer = await team.members.designer.agent.get(`${API}/queue`).expect(200);
    expect(designer.body.reviewRequested).toEqual([]);
    await team.members.reviewer.agent
      .post(`${API}/revisions/${revision.id}/transitions`)
      .send({ action: "request_changes", note: "thicker" })
      .expect(200);
    const after = await team.members.designer.agent.get(`${API}/queue`).expect(200);
    expect(after.body.changesRequested.map((r: { id: string }) => r.id)).toContain(revision.id);
    await request(server.app).get(`${API}/queue`).expect(401);
  });
});
