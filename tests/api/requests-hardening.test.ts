// Adversarial tests of request handling (issue 8, item 7): a stale save, malformed requests, formula-leading CSV
// cells and the per-request limits. Real SQLite file. Sources: RFC 9110 §15.5 (4xx for client errors: 400, 409,
// 415), OWASP "CSV Injection" (prefix =, +, -, @, tab, CR with a single quote); the limits are the product's own.
import zlib from "node:zlib";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { createTestServer, type TestServer } from "../../apps/api/test/support/context.ts";
import { TEST_HOST, TEST_ORIGIN } from "../../apps/api/test/support/auth.ts";
import {
  AR_MASK,
  createDesign,
  createProgram,
  createTeam,
  rawDesign,
  singleLayerAr,
  twoLayerAr,
  type Team,
} from "../../apps/api/test/domain/fixtures.ts";
import { designToCsv } from "../../apps/web/src/features/workspace/lib/export.ts";
import {
  MAX_LAYERS,
  MAX_POINTS_PER_BAND,
  MAX_SPEC_BANDS,
  MAX_TRIALS_PER_RUN,
} from "../../apps/api/src/lib/limits.ts";

const API = "/api/v1";
let server: TestServer;
let team: Team;

beforeAll(async () => {
  server = await createTestServer();
  team = await createTeam(server);
});
afterAll(async () => {
  await server?.close();
});

describe("a save names its base revision", () => {
  it("two designers saving from the same base: the second gets 409 naming both revisions, and nothing is lost", async () => {
    const program = await createProgram(team);
    const { design, revision: r1 } = await createDesign(team, program.id);
    const first = await team.members.designer.agent
      .post(`${API}/designs/${design.id}/revisions`)
      .send({ baseRevisionId: r1.id, stack: twoLayerAr(), note: "mine" })
      .expect(201);
    expect(first.body.number).toBe(2);
    const second = await team.members.designer2.agent
      .post(`${API}/designs/${design.id}/revisions`)
      .send({ baseRevisionId: r1.id, stack: singleLayerAr(), note: "theirs" })
      .expect(409);
    expect(second.body.error.code).toBe("stale_base");
    expect(second.body.error.message).toMatch(/rev 1\b/);
    expect(second.body.error.message).toMatch(/rev 2\b/);
    expect(second.body.error.details).toEqual({
      baseRevision: { id: r1.id, number: 1 },
      latestRevision: { id: first.body.id, number: 2 },
    });
    const view = await team.members.reviewer.agent.get(`${API}/designs/${design.id}`).expect(200);
    expect(view.body.revisions.map((r: { number: number }) => r.number)).toEqual([2, 1]);
    // Saving from the latest works.
    await team.members.designer2.agent
      .post(`${API}/designs/${design.id}/revisions`)
      .send({ baseRevisionId: first.body.id, stack: singleLayerAr(), note: "theirs, rebased" })
      .expect(201);
  });

  it("simultaneous saves from one base: exactly one succeeds", async () => {
    const program = await createProgram(team);
    const { design, revision: r1 } = await createDesign(team, program.id);
    const results = await Promise.all(
      [team.members.designer, team.members.designer2, team.members.designer].map((m, i) =>
        m.agent
          .post(`${API}/designs/${design.id}/revisions`)
          .send({ baseRevisionId: r1.id, stack: twoLayerAr(), note: `race ${i}` }),
      ),
    );
    expect(results.map((r) => r.status).sort()).toEqual([201, 409, 409]);
  });

  it("a save without a base, or with a revision of another design, is refused (400)", async () => {
    const program = await createProgram(team);
    const { design } = await createDesign(team, program.id);
    const other = await createDesign(team, program.id);
    const none = await team.members.designer.agent
      .post(`${API}/designs/${design.id}/revisions`)
      .send({ stack: twoLayerAr() })
      .expect(400);
    expect(none.body.error.message).toMatch(/baseRevisionId/);
    const foreign = await team.members.designer.agent
      .post(`${API}/designs/${design.id}/revisions`)
      .send({ baseRevisionId: other.revision.id, stack: twoLayerAr() })
      .expect(400);
    expect(foreign.body.error.code).toBe("unknown_base");
  });
});

describe("malformed requests get 4xx, never 5xx", () => {
  const raw = () =>
    request(server.app).post(`${API}/auth/sign-in`).set("Host", TEST_HOST).set("Origin", TEST_ORIGIN);

  it("Content-Type: application/json; charset=latin1 → 415", async () => {
    const res = await raw()
      .set("Content-Type", "application/json; charset=latin1")
      .send(JSON.stringify({ email: "a@b.test", password: "x" }))
      .expect(415);
    expect(res.body.error.code).toBe("unsupported_charset");
  });

  it("Content-Encoding: gzip on a body that is not gzip → 400", async () => {
    const res = await raw()
      .set("Content-Type", "application/json")
      .set("Content-Encoding", "gzip")
      .send(JSON.stringify({ email: "a@b.test", password: "x" }));
    expect(res.status).toBeGreaterThanOrEqual(400);
    expect(res.status).toBeLessThan(500);
    expect(res.body.error.message).toMatch(/could not be read|not valid/);
    // A real gzip body is read as usual.
    const ok = await raw()
      .set("Content-Type", "application/json")
      .set("Content-Encoding", "gzip")
      .serialize((body: unknown) => body as string) // send the bytes as they are, not JSON-encoded
      .send(zlib.gzipSync(JSON.stringify({ email: "nobody@halvorsen-thinfilm.test", password: "whatever" })));
    expect(ok.status, JSON.stringify(ok.body)).toBe(401);
  });

  it("an unsupported Content-Encoding → 415", async () => {
    const res = await raw()
      .set("Content-Type", "application/json")
      .set("Content-Encoding", "compress")
      .send("{}");
    expect(res.status).toBe(415);
  });

  it("%ff%fe in the path → 400 (API params and any other path)", async () => {
    const a = await team.members.designer.agent.get(`${API}/designs/%ff%fe`);
    expect(a.status).toBe(400);
    expect(a.body.error.code).toBe("malformed_uri");
    const b = await request(server.app).get("/api/v1/%ff%fe");
    expect(b.status).toBeGreaterThanOrEqual(400);
    expect(b.status).toBeLessThan(500);
    const c = await team.members.designer.agent.post(`${API}/revisions/%ff%fe/threads`).send({});
    expect(c.status).toBe(400);
  });
});

describe("CSV export neutralises formula-leading cells", () => {
  it("a design-local material named like a formula is exported as inert text", async () => {
    const program = await createProgram(team);
    const stack = {
      ...rawDesign([
        { material: '=HYPERLINK("http://evil.example","x")', thickness: 99.6 },
        { material: "@SUM(1)", thickness: 50 },
      ]),
      materials: [
        {
          id: '=HYPERLINK("http://evil.example","x")',
          name: "trap",
          model: { kind: "constant", n: 1.38 },
          role: "layer",
          source: "test",
        },
        { id: "@SUM(1)", name: "trap 2", model: { kind: "constant", n: 2.1 }, role: "layer", source: "test" },
      ],
    };
    const created = await team.members.designer.agent
      .post(`${API}/programs/${program.id}/designs`)
      .send({ name: "CSV trap", stack, note: "first" })
      .expect(201);
    const revision = await team.members.reviewer.agent
      .get(`${API}/revisions/${created.body.revision.id}`)
      .expect(200);
    const csv = designToCsv(revision.body.stack);
    const cells = csv
      .trim()
      .split("\n")
      .slice(1)
      .map((line) => line.replace(/^"/, ""));
    for (const cell of cells) expect(cell[0], cell).toBe("'");
    expect(csv).toContain(`"'=HYPERLINK(""http://evil.example"",""x"")",99.6,false`);
    expect(csv).toContain("'@SUM(1),50,false");
  });
});

describe("per-request limits, each named in the refusal", () => {
  const band = (i: number) => ({ ...AR_MASK.bands[0]!, id: `b${i}` });

  it(`more than ${MAX_SPEC_BANDS} bands in a revision mask or a program mask → 400 naming MAX_SPEC_BANDS`, async () => {
    const program = await createProgram(team);
    const { design, revision } = await createDesign(team, program.id);
    const mask = { bands: Array.from({ length: MAX_SPEC_BANDS + 1 }, (_, i) => band(i)) };
    const res = await team.members.designer.agent
      .post(`${API}/designs/${design.id}/revisions`)
      .send({ baseRevisionId: revision.id, stack: singleLayerAr(), specMask: mask })
      .expect(400);
    expect(res.body.error.code).toBe("limit_exceeded");
    expect(res.body.error.message).toContain("MAX_SPEC_BANDS");
    const prog = await team.members.approver.agent
      .post(`${API}/programs`)
      .send({ ...(await programLike()), specMask: mask })
      .expect(400);
    expect(prog.body.error.message).toContain("MAX_SPEC_BANDS");
    // At the limit it is accepted.
    await team.members.designer.agent
      .post(`${API}/designs/${design.id}/revisions`)
      .send({
        baseRevisionId: revision.id,
        stack: singleLayerAr(),
        specMask: { bands: mask.bands.slice(0, MAX_SPEC_BANDS) },
      })
      .expect(201);
  });

  it(`a band with more than ${MAX_POINTS_PER_BAND} samples → 400 naming MAX_POINTS_PER_BAND`, async () => {
    const program = await createProgram(team);
    const { design, revision } = await createDesign(team, program.id);
    const dense = { bands: [{ ...band(0), start: 400, stop: 700, step: 0.1 }] }; // 3001 samples
    const res = await team.members.designer.agent
      .post(`${API}/designs/${design.id}/revisions`)
      .send({ baseRevisionId: revision.id, stack: singleLayerAr(), specMask: dense })
      .expect(400);
    expect(res.body.error.message).toContain("MAX_POINTS_PER_BAND");
    const prog = await team.members.approver.agent
      .post(`${API}/programs`)
      .send({ ...(await programLike()), specMask: dense })
      .expect(400);
    expect(prog.body.error.message).toContain("MAX_POINTS_PER_BAND");
  });

  it(`a design with more than ${MAX_LAYERS} layers → 400 naming MAX_LAYERS (new design, new revision, import)`, async () => {
    const program = await createProgram(team);
    const layers = Array.from({ length: MAX_LAYERS + 1 }, (_, i) => ({
      material: i % 2 ? "MgF2" : "TiO2",
      thickness: 80,
    }));
    const create = await team.members.designer.agent
      .post(`${API}/programs/${program.id}/designs`)
      .send({ name: "too many", stack: rawDesign(layers), note: "x" })
      .expect(400);
    expect(create.body.error.message).toContain("MAX_LAYERS");
    const { design, revision } = await createDesign(team, program.id);
    const next = await team.members.designer.agent
      .post(`${API}/designs/${design.id}/revisions`)
      .send({ baseRevisionId: revision.id, stack: rawDesign(layers) })
      .expect(400);
    expect(next.body.error.message).toContain("MAX_LAYERS");
    const csv = ["material,thickness_nm", ...layers.map((l) => `${l.material},${l.thickness}`)].join("\n");
    const imported = await team.members.designer.agent
      .post(`${API}/imports/design`)
      .attach("file", Buffer.from(csv), { filename: "many.csv", contentType: "text/csv" })
      .field("referenceWavelength", "550")
      .field("substrate", "boro-crown");
    expect(imported.status).toBe(400);
    expect(imported.body.error.message).toContain("MAX_LAYERS");
  });

  it(`a yield run of more than ${MAX_TRIALS_PER_RUN} trials → 400 naming MAX_TRIALS_PER_RUN`, async () => {
    const program = await createProgram(team);
    const { revision } = await createDesign(team, program.id);
    const res = await team.members.designer.agent
      .post(`${API}/revisions/${revision.id}/yield-runs`)
      .send({ trials: MAX_TRIALS_PER_RUN + 1, seed: "s" })
      .expect(400);
    expect(res.body.error.message).toContain("MAX_TRIALS_PER_RUN");
    const prog = await team.members.approver.agent
      .post(`${API}/programs`)
      .send({ ...(await programLike()), studyDefaults: { trials: MAX_TRIALS_PER_RUN + 1, seed: "s" } })
      .expect(400);
    expect(prog.body.error.message).toContain("MAX_TRIALS_PER_RUN");
  });
});

async function programLike() {
  const { programBody } = await import("../../apps/api/test/domain/fixtures.ts");
  return programBody();
}
