// Physics inputs that used to poison a verdict: a design-local material with n = 1e308 (or a layer 1e308 nm thick)
// computed to NaN, passed the mask and reached release; a Cauchy model with n ≤ 0 gave T > 1. Each is now refused
// when the revision is saved, with a message naming the material, model and wavelength (or the field and value),
// and nothing is stored.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestServer, type TestServer } from "../../apps/api/test/support/context.ts";
import { createTeam, type Team } from "../../apps/api/test/domain/fixtures.ts";
import { API, avgMask, newProgram, singleAr } from "./evidence-support.ts";

let server: TestServer;
let team: Team;
beforeAll(async () => {
  server = await createTestServer();
  team = await createTeam(server);
});
afterAll(async () => {
  await server?.close();
});

/** The single-layer AR of the evidence suites with its layer made of a design-local material `model`. */
function withLocalMaterial(model: Record<string, unknown>) {
  const base = singleAr();
  return {
    ...base,
    materials: [{ id: "Poison", name: "Poisoned film", model, role: "layer", source: "attack" }],
    layers: base.layers.map((l) => ({ ...l, material: "Poison" })),
  };
}

async function save(programId: string, stack: unknown) {
  return team.members.designer.agent
    .post(`${API}/programs/${programId}/designs`)
    .send({ name: "Poisoned", stack, specMask: avgMask(1.3) });
}

async function designCount(programId: string) {
  const res = await team.members.designer.agent.get(`${API}/programs/${programId}/designs`).expect(200);
  return (res.body.items ?? res.body).length as number;
}

describe("physics inputs that cannot poison a verdict", () => {
  it("refuses a design-local material with n = 1e308, naming the material", async () => {
    const program = await newProgram(team, {});
    const res = await save(program.id, withLocalMaterial({ kind: "constant", n: 1e308, k: 0 }));
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expect(res.body.error.message).toMatch(/Poison|n/);
    expect(await designCount(program.id)).toBe(0);
  });

  it("refuses a Cauchy model whose n falls to ≤ 0 inside the evaluated band, naming the model and wavelength", async () => {
    const program = await newProgram(team, {});
    // n = A + B/λ² with λ in µm: A = −1, B = 0.6 gives n(0.55 µm) ≈ 0.98 but n(0.6 µm) ≈ 0.67 … and n ≤ 0 above 0.775 µm;
    // pick B so that n ≤ 0 already at 600 nm (the top of the 500–600 nm band): B = 0.3 → n(0.6) = −0.17.
    const res = await save(program.id, withLocalMaterial({ kind: "cauchy", A: -1, B: 0.3 }));
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expect(res.body.error.message).toMatch(/cauchy/i);
    expect(res.body.error.message).toMatch(/nm/);
    expect(await designCount(program.id)).toBe(0);
  });

  it("refuses a layer 1e308 nm thick, naming the field", async () => {
    const program = await newProgram(team, {});
    const stack = singleAr();
    const poisoned = { ...stack, layers: stack.layers.map((l) => ({ ...l, thickness: 1e308 })) };
    const res = await save(program.id, poisoned);
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expect(JSON.stringify(res.body.error)).toMatch(/thickness/);
    expect(await designCount(program.id)).toBe(0);
  });

  it("refuses the same poison in a new revision of an existing design", async () => {
    const program = await newProgram(team, {});
    const first = await save(program.id, singleAr());
    expect(first.status, JSON.stringify(first.body)).toBe(201);
    const designId = first.body.design?.id ?? first.body.revision.designId;
    const res = await team.members.designer.agent
      .post(`${API}/designs/${designId}/revisions`)
      .send({
        baseRevisionId: first.body.revision.id,
        stack: withLocalMaterial({ kind: "constant", n: 1e308, k: 0 }),
        note: "poison",
      });
    expect(res.status, JSON.stringify(res.body)).toBe(400);
  });
});
