// Calibration of a program's process model through the API on a real SQLite file: lots of four coating runs,
// each part fitted on the server (priors from the program's quartz-crystal process model), the calibration view
// returning the process parameters with intervals next to the independent-error ones, and the approver adopting
// the calibrated process model through the existing program update (which must keep the process structure).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { computeSpectrum, type ErrorModel } from "@stackproof/optics";
import { createTestServer, type TestServer } from "../support/context.ts";
import { API, createDesign, createProgram, createTeam, singleLayerAr, type Team } from "./fixtures.ts";

let server: TestServer;
let team: Team;
let programId: string;
let revisionId: string;

const processModel: ErrorModel = {
  thickness: { relativePct: 0, absoluteNm: 0, distribution: "normal" },
  // the program assumes a perfectly calibrated crystal (no tooling error) and 0.2 % noise per layer
  process: { control: { MgF2: { method: "crystal", toolingPct: 0, noisePct: 0.2, terminationNm: 0.1 } } },
};

beforeAll(async () => {
  server = await createTestServer();
  team = await createTeam(server);
  programId = (await createProgram(team, { errorModel: processModel })).id;
  revisionId = (await createDesign(team, programId)).revision.id;
});
afterAll(async () => {
  await server.close();
});

const wl = Array.from({ length: 61 }, (_, i) => 450 + i * 5);
const rOf = (f: number) => {
  const d = singleLayerAr();
  d.layers[0]!.thickness *= f;
  return Array.from(computeSpectrum(d, { wavelengths: wl }).u.R, (r) => r * 100);
};

describe("process-model calibration", () => {
  it("fits the parts of four runs, estimates the crystal tooling with its chi-square interval, and the approver adopts it", async () => {
    // four runs whose MgF2 came out +1.2 %, −0.8 %, +0.6 %, −1.5 %: a tooling spread the model does not have
    const factors = [1.012, 0.992, 1.006, 0.985];
    for (const [k, f] of factors.entries()) {
      const r = rOf(f);
      const csv = "wavelength_nm,part-A\n" + wl.map((w, i) => `${w},${r[i]!.toFixed(5)}`).join("\n");
      const lot = await team.members.designer.agent
        .post(`${API}/revisions/${revisionId}/lots`)
        .field("runId", `R-${k + 1}`)
        .field("runDate", `2026-11-0${k + 1}`)
        .field("quantity", "R")
        .field("scale", "percent")
        .field("uncertaintyPct", "0.02")
        .attach("file", Buffer.from(csv), `run-${k + 1}.csv`)
        .expect(201);
      const partId = lot.body.parts[0].id;
      const fit = await team.members.designer.agent
        .post(`${API}/parts/${partId}/fit`)
        .send({ fitIndexScale: false })
        .expect(200);
      expect(fit.body.fit.layers[0]).toMatchObject({ material: "MgF2", determinable: true });
      expect(fit.body.fit.layers[0].errorPct).toBeCloseTo((f - 1) * 100, 1);
    }
    const cal = await team.members.reviewer.agent.get(`${API}/programs/${programId}/calibration`).expect(200);
    const process = cal.body.calibration.process;
    expect(process.runs).toBe(4);
    const tooling = process.parameters.find((p: { parameter: string }) => p.parameter === "toolingPct");
    // sample σ of the four run errors is 1.19 %; chi-square interval with ν = 3 (NIST/SEMATECH 1.3.5.8)
    expect(tooling).toMatchObject({
      material: "MgF2",
      method: "crystal",
      interval: "chi-square",
      dof: 3,
      current: 0,
      consistent: false,
    });
    expect(tooling.value).toBeGreaterThan(1.0);
    expect(tooling.value).toBeLessThan(1.4);
    expect(tooling.low).toBeLessThan(tooling.value);
    expect(tooling.high).toBeGreaterThan(2 * tooling.value);
    // one layer per run: the per-layer noise cannot be told apart from the tooling, and the view says so
    expect(process.notes.join(" ")).toMatch(
      /too few determinable layers per run to estimate the crystal noise; the program's 0.2 % is kept/,
    );
    const proposed = process.proposed as ErrorModel;
    expect(proposed.process!.control).toEqual({
      MgF2: {
        method: "crystal",
        toolingPct: Math.round(tooling.value * 1000) / 1000,
        noisePct: 0.2,
        terminationNm: 0.1,
      },
    });
    expect(cal.body.adoptWith).toMatch(/calibration\.process\.proposed/);

    // adoption is the program update of the approver (a designer may not); the process structure is kept
    await team.members.designer.agent
      .patch(`${API}/programs/${programId}`)
      .send({ errorModel: proposed })
      .expect(403);
    await team.members.approver.agent
      .patch(`${API}/programs/${programId}`)
      .send({ errorModel: proposed })
      .expect(200);
    const program = await team.members.reviewer.agent.get(`${API}/programs/${programId}`).expect(200);
    expect(program.body.errorModel.process.control.MgF2).toEqual(
      (proposed.process!.control as Record<string, unknown>).MgF2,
    );
    const after = await team.members.reviewer.agent
      .get(`${API}/programs/${programId}/calibration`)
      .expect(200);
    expect(after.body.current.process.control.MgF2.toolingPct).toBeCloseTo(tooling.value, 2);
  }, 120000);

  it("a program without a process model gets no process calibration", async () => {
    const other = (await createProgram(team)).id;
    const cal = await team.members.reviewer.agent.get(`${API}/programs/${other}/calibration`).expect(200);
    expect(cal.body.calibration).toBeNull();
  });
});
