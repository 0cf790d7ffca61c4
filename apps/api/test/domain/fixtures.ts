// A workspace with one member per role (and a second approver and designer), plus small designs and masks.
import { expect } from "vitest";
import {
  DESIGN_FORMAT,
  designFromQwots,
  type Design,
  type ErrorModel,
  type SpecMask,
} from "@stackproof/optics";
import type { TestServer } from "../support/context.ts";
import {
  createMember,
  signIn,
  signedInMember,
  type CreatedMember,
  type MemberAgent,
} from "../support/auth.ts";
import type { Role } from "../../src/db/schema.ts";

export const API = "/api/v1";

export interface Team {
  workspaceId: string;
  members: Record<
    "admin" | "designer" | "designer2" | "reviewer" | "approver" | "approver2",
    CreatedMember & { agent: MemberAgent }
  >;
}

export async function createTeam(server: TestServer): Promise<Team> {
  const admin = await signedInMember(server, { roles: ["admin"], name: "Maren Kolstad" });
  const add = async (roles: Role[], name: string) => {
    const m = await createMember(server, { roles, name, workspaceId: admin.workspaceId });
    return { ...m, agent: await signIn(server, m.email, m.password) };
  };
  return {
    workspaceId: admin.workspaceId,
    members: {
      admin,
      designer: await add(["designer"], "Ilse Varga"),
      designer2: await add(["designer"], "Oskar Lind"),
      reviewer: await add(["reviewer"], "Tobiah Renwick"),
      approver: await add(["approver"], "Sunniva Achterberg"),
      approver2: await add(["approver"], "Edvin Moss"),
    },
  };
}

/**
 * Single quarter-wave MgF2 layer at 550 nm on borosilicate crown, back surface not counted: about 1.3 % reflectance
 * at 550 nm (Macleod, single-layer AR: R = ((n0 ns − n1²)/(n0 ns + n1²))², n1 = 1.38, ns = 1.52 → 1.26 %).
 */
export function singleLayerAr(name = "Single-layer AR"): Design {
  return designFromQwots({
    name,
    referenceWavelength: 550,
    layers: [{ material: "MgF2", qwot: 1 }],
    substrate: { material: "boro-crown", thicknessMm: 1, backside: false },
  });
}

/** Two-layer variant (Al2O3 + MgF2), for diffs. */
export function twoLayerAr(name = "Single-layer AR"): Design {
  return designFromQwots({
    name,
    referenceWavelength: 550,
    layers: [
      { material: "Al2O3", qwot: 1 },
      { material: "MgF2", qwot: 1.05 },
    ],
    substrate: { material: "boro-crown", thicknessMm: 1, backside: false },
  });
}

/** Loose visible AR spec: average R ≤ 2 % over 500–600 nm, peak R ≤ 3 %. The single layer passes with margin. */
export const AR_MASK: SpecMask = {
  bands: [
    {
      id: "avg",
      label: "Average",
      start: 500,
      stop: 600,
      step: 5,
      quantity: "R",
      polarization: "u",
      angleDeg: 0,
      requirement: "avgMax",
      value: 2,
    },
    {
      id: "peak",
      label: "Peak",
      start: 500,
      stop: 600,
      step: 5,
      quantity: "R",
      polarization: "u",
      angleDeg: 0,
      requirement: "max",
      value: 3,
    },
  ],
};

/** A spec the single layer cannot meet (R ≤ 0.2 % everywhere): yield 0. */
export const IMPOSSIBLE_MASK: SpecMask = {
  bands: [
    {
      id: "tight",
      start: 450,
      stop: 650,
      step: 10,
      quantity: "R",
      polarization: "u",
      angleDeg: 0,
      requirement: "max",
      value: 0.2,
    },
  ],
};

export const ERROR_MODEL: ErrorModel = {
  thickness: { relativePct: 1, absoluteNm: 0.5, distribution: "normal" },
};

export function programBody(overrides: Record<string, unknown> = {}) {
  return {
    name: "Test program — visible AR",
    customer: "Halvorsen test bench",
    description: "Single-layer AR for tests",
    application: "Window",
    protective: false,
    targetYield: 0.8,
    // Small for test speed, above the floor of 100; 120 of 120 passing bounds the yield at 0.969 (95 % Wilson).
    minEvidenceTrials: 120,
    specMask: AR_MASK,
    errorModel: ERROR_MODEL,
    studyDefaults: { trials: 120, seed: "test-seed" },
    ...overrides,
  };
}

export async function createProgram(team: Team, overrides: Record<string, unknown> = {}) {
  const res = await team.members.admin.agent.post(`${API}/programs`).send(programBody(overrides));
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: string; name: string; targetYield: number };
}

export async function createDesign(
  team: Team,
  programId: string,
  stack: Design = singleLayerAr(),
  by = team.members.designer,
) {
  const res = await by.agent
    .post(`${API}/programs/${programId}/designs`)
    .send({ name: "AR window", stack, note: "first" });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as {
    design: { id: string; name: string };
    revision: { id: string; number: number; hash: string; status: string };
  };
}

/** Polls a yield run until it is no longer queued or running. */
export async function waitForRun(agent: MemberAgent, runId: string, timeoutMs = 30000) {
  const start = Date.now();
  for (;;) {
    const res = await agent.get(`${API}/yield-runs/${runId}`).expect(200);
    if (res.body.status !== "queued" && res.body.status !== "running") return res.body;
    if (Date.now() - start > timeoutMs) throw new Error(`yield run ${runId} still ${res.body.status}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

export async function startRun(agent: MemberAgent, revisionId: string, body: Record<string, unknown> = {}) {
  const res = await agent
    .post(`${API}/revisions/${revisionId}/yield-runs`)
    .send({ trials: 120, seed: "s1", ...body });
  expect(res.status, JSON.stringify(res.body)).toBe(202);
  return res.body.run as { id: string; status: string };
}

/** Starts (or finds) the revision's evidence run: server-assigned seed, the program's minimum trials. */
export async function startEvidenceRun(
  agent: MemberAgent,
  revisionId: string,
  body: Record<string, unknown> = {},
) {
  const res = await agent.post(`${API}/revisions/${revisionId}/evidence-run`).send(body);
  expect(res.status, JSON.stringify(res.body)).toBe(202);
  return res.body.run as { id: string; status: string; seed: string; trials: number; kind: string };
}

export const rawDesign = (layers: { material: string; thickness: number }[]) => ({
  format: DESIGN_FORMAT,
  name: "raw",
  referenceWavelength: 550,
  layers,
  substrate: { material: "boro-crown", thicknessMm: 1, backside: false },
});

/** The id of a design's latest revision: the base a save must name (POST /designs/:id/revisions baseRevisionId). */
export async function latestRevisionId(
  agent: { get(url: string): PromiseLike<{ body: { revisions: { id: string }[] } }> },
  designId: string,
): Promise<string> {
  const res = await agent.get(`/api/v1/designs/${designId}`);
  const id = res.body.revisions[0]?.id;
  if (!id) throw new Error(`design ${designId} has no revision`);
  return id;
}
