// Shared set-up of the evidence suites: a real context on a temporary SQLite file (apps/api/test/support), a team with
// one member per role, and a single-layer AR whose honest yield is low against a tight average-reflectance band.
import { expect } from "vitest";
import {
  designFromQwots,
  mergeYieldChunks,
  runYieldChunk,
  type ErrorModel,
  type SpecMask,
  type YieldStudy,
} from "@stackproof/optics";
import type { MemberAgent } from "../../apps/api/test/support/auth.ts";
import { API, waitForRun, type Team } from "../../apps/api/test/domain/fixtures.ts";

export { API, waitForRun };

/** MgF2 quarter wave at 550 nm on borosilicate crown: average R over 500–600 nm ≈ 1.30 % (Macleod single-layer AR). */
export const singleAr = () =>
  designFromQwots({
    name: "Single AR",
    referenceWavelength: 550,
    layers: [{ material: "MgF2", qwot: 1 }],
    substrate: { material: "boro-crown", thicknessMm: 1, backside: false },
  });

/** Average R ≤ `avgMax` % over 500–600 nm. At 1.30 the nominal design passes by under 0.001 %. */
export const avgMask = (avgMax: number): SpecMask => ({
  bands: [
    {
      id: "avg",
      label: "Visible average",
      start: 500,
      stop: 600,
      step: 5,
      quantity: "R",
      polarization: "u",
      angleDeg: 0,
      requirement: "avgMax",
      value: avgMax,
    },
  ],
});

/** 6 % (1 σ) thickness errors: against avgMask(1.30) the honest yield is about 16 % (measured here: 0.16 at 400 trials). */
export const ROUGH: ErrorModel = { thickness: { relativePct: 6, absoluteNm: 0.5, distribution: "normal" } };
/** 3 % errors: against avgMask(1.32) the honest yield is about 92 %. */
export const MEDIUM: ErrorModel = { thickness: { relativePct: 3, absoluteNm: 0.5, distribution: "normal" } };

export async function newProgram(team: Team, body: Record<string, unknown>, by = team.members.admin) {
  const res = await by.agent.post(`${API}/programs`).send({
    name: "Evidence program",
    customer: "Test bench",
    targetYield: 0.9,
    minEvidenceTrials: 200,
    specMask: avgMask(1.3),
    errorModel: ROUGH,
    ...body,
  });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: string; version: number; minEvidenceTrials: number; confidence: number };
}

export async function newDesign(
  team: Team,
  programId: string,
  specMask?: SpecMask,
  by = team.members.designer,
) {
  const res = await by.agent
    .post(`${API}/programs/${programId}/designs`)
    .send({ name: "AR window", stack: singleAr(), ...(specMask ? { specMask } : {}) });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.revision as { id: string; hash: string; specMask: SpecMask; stack: YieldStudy["design"] };
}

export const act = (
  agent: MemberAgent,
  revisionId: string,
  action: string,
  extra: Record<string, unknown> = {},
) => agent.post(`${API}/revisions/${revisionId}/transitions`).send({ action, ...extra });

export async function evidenceRun(agent: MemberAgent, revisionId: string) {
  const res = await agent.post(`${API}/revisions/${revisionId}/evidence-run`).send({});
  expect(res.status, JSON.stringify(res.body)).toBe(202);
  return waitForRun(agent, res.body.run.id);
}

export async function gateOf(agent: MemberAgent, revisionId: string) {
  const res = await agent.get(`${API}/revisions/${revisionId}/gate`).expect(200);
  return res.body as {
    canApprove: boolean;
    checks: { id: string; ok: boolean; message: string }[];
    evidence: {
      seed: string;
      minTrials: number;
      confidence: number;
      programVersion: number;
      figures: { yield: number; lowerBound: number; trials: number; pass: boolean } | null;
    };
    deviation: { required: boolean; accepted: boolean; current: { id: string; status: string } | null };
  };
}

export const check = (gate: { checks: { id: string; ok: boolean; message: string }[] }, id: string) =>
  gate.checks.find((c) => c.id === id);

/** The yield of `trials` trials of a study computed here with the optics package (what an attacker can do offline). */
export function offline(study: YieldStudy) {
  return mergeYieldChunks(study, [runYieldChunk(study, 0, study.trials)]);
}
