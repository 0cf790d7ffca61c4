// Colour requirements in stored masks: validation at the edge, the nominal verdict, the content hash, the
// spec-deviation comparison, request limits and a verified yield run. Real SQLite file, real worker pool.
import { createHash } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { describeColourIso, evaluateSpec, type SpecMask } from "@stackproof/optics";
import { createTestServer, type TestServer } from "../support/context.ts";
import { canonicalJson } from "../../src/domain/canonical.ts";
import { MAX_SPEC_BANDS } from "../../src/lib/limits.ts";
import {
  API,
  AR_MASK,
  createDesign,
  createProgram,
  createTeam,
  programBody,
  singleLayerAr,
  startEvidenceRun,
  startRun,
  waitForRun,
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

// A quarter-wave MgF2 AR reflects a purple residual: a* > 0, b* < 0 (common practice, no source; the optics
// tests check it). The box below contains it; TIGHT excludes it.
const TINT = {
  id: "tint",
  label: "Reflected tint",
  quantity: "R",
  limit: { type: "box-ab", a: [0, 40], b: [-40, 0] },
} as const;
const TIGHT = { ...TINT, limit: { type: "box-ab", a: [-1, 1], b: [-1, 1] } } as const;
const COLOUR_MASK = { ...AR_MASK, colour: [TINT] };

describe("colour requirements in stored masks", () => {
  it("a program mask with a colour requirement: stored with its defaults, judged with the bands, hashed", async () => {
    const program = await createProgram(team, { specMask: COLOUR_MASK });
    const read = await team.members.reviewer.agent.get(`${API}/programs/${program.id}`).expect(200);
    expect(read.body.specMask.colour).toEqual([
      { ...TINT, illuminant: "D65", observer: "2", angleDeg: 0, polarization: "u" },
    ]);
    const { revision } = await createDesign(team, program.id);
    const full = await team.members.reviewer.agent.get(`${API}/revisions/${revision.id}`).expect(200);
    expect(full.body.nominal.bands.map((b: { id: string }) => b.id)).toEqual(["avg", "peak", "tint"]);
    const tint = full.body.nominal.bands[2];
    expect(tint.pass).toBe(true);
    expect(tint.colour).toMatchObject({
      quantity: "R",
      illuminant: "D65",
      observer: "2",
      limiting: expect.any(String),
    });
    expect(tint.colour.swatch).toMatch(/^#[0-9a-f]{6}$/);
    // the verdict is the optics package's own, computed on the server's pool
    const local = evaluateSpec(full.body.stack, full.body.specMask as SpecMask).bands[2]!;
    expect(tint.margin).toBeCloseTo(local.margin, 12);
    expect(tint.colour.a).toBeCloseTo(local.colour!.a, 12);
    // content hash of the canonical {stack, mask as stored}: the colour requirement with its defaults filled in
    const stored = {
      ...AR_MASK,
      colour: [{ ...TINT, illuminant: "D65", observer: "2", angleDeg: 0, polarization: "u" }],
    };
    expect(full.body.hash).toBe(
      createHash("sha256")
        .update(canonicalJson({ stack: full.body.stack, specMask: stored }))
        .digest("hex"),
    );
  });

  it("a failing colour fails the nominal verdict although every band passes", async () => {
    const program = await createProgram(team, { specMask: { ...AR_MASK, colour: [TIGHT] } });
    const { revision } = await createDesign(team, program.id);
    const full = await team.members.reviewer.agent.get(`${API}/revisions/${revision.id}`).expect(200);
    expect(
      full.body.nominal.bands.filter((b: { pass: boolean }) => b.pass).map((b: { id: string }) => b.id),
    ).toEqual(["avg", "peak"]);
    expect(full.body.nominal.pass).toBe(false);
    expect(full.body.nominal.bands[2].reason).toMatch(/outside the box/);
  });

  it("changing, adding or removing a colour requirement in a revision is a spec deviation naming its id; the hash changes", async () => {
    const program = await createProgram(team, { specMask: COLOUR_MASK });
    const { design, revision } = await createDesign(team, program.id);
    const save = (specMask: unknown, base: string) =>
      team.members.designer.agent
        .post(`${API}/designs/${design.id}/revisions`)
        .send({ baseRevisionId: base, stack: singleLayerAr(), specMask, note: "colour" })
        .expect(201);
    const deviation = async (id: string) =>
      (await team.members.reviewer.agent.get(`${API}/revisions/${id}/deviations`).expect(200)).body;
    expect((await deviation(revision.id)).required).toBe(false);
    const changed = await save(
      { ...AR_MASK, colour: [{ ...TINT, limit: { type: "box-ab", a: [0, 30], b: [-40, 0] } }] },
      revision.id,
    );
    expect(changed.body.hash).not.toBe(revision.hash);
    expect((await deviation(changed.body.id)).bands).toEqual([{ id: "tint", change: "changed" }]);
    const removed = await save(AR_MASK, changed.body.id);
    expect((await deviation(removed.body.id)).bands).toEqual([{ id: "tint", change: "removed" }]);
    const added = await save(
      { ...COLOUR_MASK, colour: [TINT, { ...TINT, id: "tint-t", quantity: "T" }] },
      removed.body.id,
    );
    expect((await deviation(added.body.id)).bands).toEqual([{ id: "tint-t", change: "added" }]);
    // the same colour requirement written without its defaults is the same mask: no deviation, same hash
    const same = await save(COLOUR_MASK, added.body.id);
    expect((await deviation(same.body.id)).required).toBe(false);
    expect(same.body.hash).toBe(revision.hash);
  });

  it("a review thread can be pinned to a colour requirement; its verdict follows the colour", async () => {
    const program = await createProgram(team, { specMask: { ...AR_MASK, colour: [TIGHT] } });
    const { revision } = await createDesign(team, program.id);
    const opened = await team.members.reviewer.agent
      .post(`${API}/revisions/${revision.id}/threads`)
      .send({
        anchor: { kind: "band", bandId: "tint" },
        severity: "advisory",
        body: "The reflected tint leaves the box.",
      })
      .expect(201);
    expect(opened.body.anchorPasses).toBe(false);
    await team.members.reviewer.agent
      .post(`${API}/revisions/${revision.id}/threads`)
      .send({ anchor: { kind: "band", bandId: "nope" }, severity: "advisory", body: "No such requirement." })
      .expect(422);
  });

  it("refuses a bad colour requirement with 400 naming the field, and counts colour toward MAX_SPEC_BANDS", async () => {
    const bad = await team.members.approver.agent
      .post(`${API}/programs`)
      .send(
        programBody({
          specMask: {
            ...AR_MASK,
            colour: [{ ...TINT, limit: { type: "box-xy", x: [0.4, 0.3], y: [0, 1] } }],
          },
        }),
      )
      .expect(400);
    expect(JSON.stringify(bad.body.error)).toMatch(/colour\.0\.limit\.x/);
    const dup = await team.members.approver.agent
      .post(`${API}/programs`)
      .send(programBody({ specMask: { ...AR_MASK, colour: [{ ...TINT, id: "avg" }] } }))
      .expect(400);
    expect(JSON.stringify(dup.body.error)).toMatch(/duplicate id/);
    const bands = Array.from({ length: MAX_SPEC_BANDS - 1 }, (_, i) => ({
      ...AR_MASK.bands[0]!,
      id: `b${i}`,
    }));
    const many = await team.members.approver.agent
      .post(`${API}/programs`)
      .send(programBody({ specMask: { bands, colour: [TINT, { ...TINT, id: "tint-2" }] } }))
      .expect(400);
    expect(many.body.error.message).toContain("MAX_SPEC_BANDS");
    expect(many.body.error.message).toContain("2 colour requirements");
    // a mask of colour requirements alone is a mask
    await team.members.approver.agent
      .post(`${API}/programs`)
      .send(programBody({ specMask: { bands: [], colour: [TINT] } }))
      .expect(201);
  });

  it("a yield run counts failures of the colour requirement by its id", async () => {
    const program = await createProgram(team, { specMask: { ...AR_MASK, colour: [TIGHT] } });
    const { revision } = await createDesign(team, program.id);
    const run = await startRun(team.members.designer.agent, revision.id, { trials: 120 });
    const done = await waitForRun(team.members.designer.agent, run.id, 60000);
    expect(done.status).toBe("done");
    expect(done.result.bandFailures.map((b: { id: string }) => b.id)).toEqual(["avg", "peak", "tint"]);
    expect(done.result.bandFailures[2].count).toBe(120);
    expect(done.result.yield).toBe(0);
  });
});

describe("release record wording of colour requirements", () => {
  it("the record, the printable page and the PDF state each colour requirement in ISO 9211 style words", async () => {
    const program = await createProgram(team, { specMask: COLOUR_MASK });
    const { revision } = await createDesign(team, program.id);
    const act = (agent: Team["members"]["designer"]["agent"], action: string) =>
      agent.post(`${API}/revisions/${revision.id}/transitions`).send({ action });
    await act(team.members.designer.agent, "submit").expect(200);
    const run = await startEvidenceRun(team.members.designer.agent, revision.id);
    expect((await waitForRun(team.members.designer.agent, run.id, 60000)).status).toBe("done");
    await act(team.members.approver.agent, "approve").expect(200);
    const released = await act(team.members.approver.agent, "release").expect(200);
    const id: string = released.body.releaseId;
    const wording = describeColourIso({ ...TINT, limit: { type: "box-ab", a: [0, 40], b: [-40, 0] } });
    expect(wording).toBe(
      "Colour of reflected light: CIE 1931 standard colorimetric observer (2°), CIE illuminant D65; angle of incidence 0°; unpolarized; CIELAB 0 ≤ a* ≤ 40 and −40 ≤ b* ≤ 0",
    );
    const record = await team.members.reviewer.agent.get(`${API}/releases/${id}`).expect(200);
    expect(record.body.revision.specMask.colour[0].id).toBe("tint");
    expect(record.body.nominal.bands.map((b: { id: string }) => b.id)).toEqual(["avg", "peak", "tint"]);
    expect(record.body.yieldRun.bandFailures.map((b: { id: string }) => b.id)).toEqual([
      "avg",
      "peak",
      "tint",
    ]);
    const print = await team.members.reviewer.agent.get(`${API}/releases/${id}/print`).expect(200);
    expect(print.text).toContain("Reflected tint (tint)");
    expect(print.text).toContain(wording);
    expect(print.text).toMatch(/colour: L\* [\d.]+, a\* [\d.]+, b\* −[\d.]+/);
    const pdf = await team.members.reviewer.agent
      .get(`${API}/releases/${id}/pdf`)
      .buffer(true)
      .parse((res, cb) => {
        const chunks: Buffer[] = [];
        res.on("data", (c: Buffer) => chunks.push(c));
        res.on("end", () => cb(null, Buffer.concat(chunks)));
      })
      .expect(200);
    expect((pdf.body as Buffer).subarray(0, 5).toString()).toBe("%PDF-");
  });
});
