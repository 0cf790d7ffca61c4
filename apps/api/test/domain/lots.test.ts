// Measured lots on a real SQLite file: upload, verdicts with the guard band, roles, refusals that store nothing,
// part fits, calibration proposal and witness-film materials.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { computeSpectrum } from "@stackproof/optics";
import { createTestServer, type TestServer } from "../support/context.ts";
import { API, createDesign, createProgram, createTeam, singleLayerAr, type Team } from "./fixtures.ts";

let server: TestServer;
let team: Team;
let revisionId: string;
let programId: string;
beforeAll(async () => {
  server = await createTestServer();
  team = await createTeam(server);
  programId = (await createProgram(team)).id;
  revisionId = (await createDesign(team, programId)).revision.id;
});
afterAll(async () => {
  await server.close();
});

const count = (table: string) =>
  (server.ctx.db.$client.prepare(`SELECT count(*) AS n FROM ${table}`).get() as { n: number }).n;
const snapshot = () => [count("measured_lots"), count("measured_parts"), count("audit_log"), count("materials")];

const wl = Array.from({ length: 61 }, (_, i) => 450 + i * 5);
/** R (percent) of the single-layer AR with thickness factor f. */
const arR = (f: number) => {
  const d = singleLayerAr();
  d.layers[0]!.thickness *= f;
  return Array.from(computeSpectrum(d, { wavelengths: wl }).u.R, (r) => r * 100);
};

/** A lot file: nominal part, a part far out (R = 5 %), a part exactly at the 3 % peak limit at 550 nm. */
function lotCsv(sep: string, decimalComma: boolean, fraction: boolean) {
  const good = arR(1);
  const fmt = (v: number) => {
    const x = fraction ? v / 100 : v;
    const s = x.toFixed(6);
    return decimalComma ? s.replace(".", ",") : s;
  };
  const lines = [["Wavelength (nm)", "P-001", "P-002", "P-003"].join(sep)];
  wl.forEach((w, i) => {
    const atLimit = w === 550 ? 3 : Math.min(good[i]!, 1.5);
    lines.push([String(w), fmt(good[i]!), fmt(5), fmt(atLimit)].join(sep));
  });
  return lines.join("\r\n") + "\r\n";
}

const lotFields = (req: ReturnType<Team["members"]["designer"]["agent"]["post"]>, extra: Record<string, string | undefined> = {}) => {
  const fields: Record<string, string | undefined> = {
    runId: "R-2026-118",
    runDate: "2026-11-30",
    chamber: "Box coater 2",
    quantity: "R",
    angleDeg: "0",
    polarization: "u",
    uncertaintyPct: "0.1",
    scale: "percent",
    ...extra,
  };
  for (const [k, v] of Object.entries(fields)) if (v !== undefined) req.field(k, v);
  return req;
};

describe("lot preview", () => {
  it("detects semicolons, decimal comma and fractions, and stores nothing", async () => {
    const before = snapshot();
    const res = await team.members.designer.agent
      .post(`${API}/lots/preview`)
      .attach("file", Buffer.from(lotCsv(";", true, true)), "lot.csv")
      .expect(200);
    expect(res.body).toMatchObject({ delimiter: ";", decimalComma: true, detectedScale: "fraction", rows: 61, columns: ["P-001", "P-002", "P-003"] });
    const tab = await team.members.designer.agent
      .post(`${API}/lots/preview`)
      .attach("file", Buffer.from(lotCsv("\t", false, false)), "lot.txt")
      .expect(200);
    expect(tab.body).toMatchObject({ delimiter: "tab", decimalComma: false, detectedScale: "percent" });
    expect(snapshot()).toEqual(before);
  });
});

describe("lot upload", () => {
  let lotId = "";
  it("stores the lot with per-part verdicts; the part exactly at the limit fails with the guard band", async () => {
    const ok = await lotFields(team.members.designer.agent.post(`${API}/revisions/${revisionId}/lots`), { scale: "fraction" })
      .attach("file", Buffer.from(lotCsv(";", true, true)), "lot.csv")
      .expect(201);
    lotId = ok.body.id;
    const status = Object.fromEntries(ok.body.parts.map((p: { label: string; status: string }) => [p.label, p.status]));
    expect(status).toEqual({ "P-001": "pass", "P-002": "fail", "P-003": "fail" });
    const p3 = ok.body.parts.find((p: { label: string }) => p.label === "P-003");
    const peak = p3.verdict.bands.find((b: { bandId: string }) => b.bandId === "peak");
    expect(peak.margin).toBeCloseTo(0, 9);
    expect(peak.status).toBe("fail");
    expect(ok.body.summary).toMatchObject({ parts: 3, evaluated: 3, passed: 1 });
    expect(ok.body.summary.interval.low).toBeGreaterThan(0);
    const audit = server.ctx.db.$client.prepare("SELECT action FROM audit_log WHERE subject_id = ?").all(lotId) as { action: string }[];
    expect(audit.map((a) => a.action)).toContain("lot.created");
  });

  it("is readable by every role; a reviewer cannot upload (403) and nothing is stored", async () => {
    for (const m of ["reviewer", "approver", "designer2", "admin"] as const) {
      const res = await team.members[m].agent.get(`${API}/lots/${lotId}`).expect(200);
      expect(res.body.parts).toHaveLength(3);
      const list = await team.members[m].agent.get(`${API}/programs/${programId}/lots`).expect(200);
      expect(list.body.items.some((l: { id: string }) => l.id === lotId)).toBe(true);
    }
    const before = snapshot();
    await lotFields(team.members.reviewer.agent.post(`${API}/revisions/${revisionId}/lots`))
      .attach("file", Buffer.from(lotCsv(",", false, false)), "lot.csv")
      .expect(403);
    expect(snapshot()).toEqual(before);
  });

  it("adds a second file to the lot (T of the same parts) and keeps both spectra per part", async () => {
    const res = await lotFields(team.members.designer.agent.post(`${API}/lots/${lotId}/spectra`), { quantity: "T" })
      .attach("file", Buffer.from(lotCsv(",", false, false).replace(/\n(\d+),([\d.]+),([\d.]+),([\d.]+)/g, (_m, w, a, b, c) => `\n${w},${(100 - +a).toFixed(4)},${(100 - +b).toFixed(4)},${(100 - +c).toFixed(4)}`)), "lot-T.csv")
      .expect(200);
    const p1 = res.body.parts.find((p: { label: string }) => p.label === "P-001");
    expect(p1.measurements.map((m: { quantity: string }) => m.quantity)).toEqual(["R", "T"]);
  });

  it("fits a part with the program's error model and offers a calibration proposal", async () => {
    const lot = await team.members.reviewer.agent.get(`${API}/lots/${lotId}`).expect(200);
    const p1 = lot.body.parts.find((p: { label: string }) => p.label === "P-001");
    await team.members.reviewer.agent.post(`${API}/parts/${p1.id}/fit`).send({}).expect(403);
    const fit = await team.members.designer.agent.post(`${API}/parts/${p1.id}/fit`).send({ fitIndexScale: false }).expect(200);
    expect(fit.body.fit.models.length).toBeGreaterThan(0);
    expect(fit.body.fit.layers[0].material).toBe("MgF2");
    const cal = await team.members.reviewer.agent.get(`${API}/programs/${programId}/calibration`).expect(200);
    expect(cal.body.history).toHaveLength(1);
    expect(cal.body.calibration.runs).toBe(1);
    expect(cal.body.calibration.notes.join(" ")).toMatch(/at least 3/);
    expect(cal.body.adoptWith).toMatch(/PATCH/);
  });
});

describe("refusals store nothing", () => {
  const refuse = async (csv: string, extra: Record<string, string | undefined>, status: number, message: RegExp) => {
    const before = snapshot();
    const res = await lotFields(team.members.designer.agent.post(`${API}/revisions/${revisionId}/lots`), extra)
      .attach("file", Buffer.from(csv), "bad.csv")
      .expect(status);
    expect(JSON.stringify(res.body.error)).toMatch(message);
    expect(snapshot()).toEqual(before);
  };
  it("fraction chosen for a file in percent", () => refuse(lotCsv(",", false, false), { scale: "fraction" }, 422, /fraction between 0 and 1/));
  it("decimal comma with comma separators", () =>
    refuse("wavelength_nm,P1\n500,1,5\n600,2,5\n", {}, 422, /expected 2 cells|decimal comma/));
  it("no wavelength column", () => refuse("x;P1\n500;1\n600;2\n", {}, 422, /no wavelength column/));
  it("wavelengths out of order", () => refuse("nm,P1\n500,1\n600,2\n550,1\n", {}, 422, /strictly ascending or strictly descending/));
  it("a column named twice", () => refuse("nm,P1,P1\n500,1,1\n600,2,2\n", {}, 422, /appears twice/));
  it("no confirmed scale (percent or fraction)", () => refuse(lotCsv(",", false, false), { scale: undefined }, 400, /scale.*required/));
  it("no run id", () => refuse(lotCsv(",", false, false), { runId: undefined }, 400, /runId.*required/));
  it("a bad run date", () => refuse(lotCsv(",", false, false), { runDate: "30.11.2026" }, 400, /YYYY-MM-DD/));
  it("a band outside the measured range is not a pass (part incomplete), and the upload is stored honestly", async () => {
    const res = await lotFields(team.members.designer.agent.post(`${API}/revisions/${revisionId}/lots`), { angleDeg: "45" })
      .attach("file", Buffer.from(lotCsv(",", false, false)), "oblique.csv")
      .expect(201);
    expect(res.body.parts.every((p: { status: string }) => p.status === "incomplete")).toBe(true);
    expect(res.body.summary).toMatchObject({ evaluated: 0, yield: null });
  });
});

describe("witness film", () => {
  it("fits a film's T and stores it as a workspace material with its fit quality", async () => {
    // a 600 nm film of n ≈ 2.0 (Cauchy, lossless) on boro-crown, back surface counted
    const d = {
      format: "stackproof.design/v1" as const,
      name: "film",
      referenceWavelength: 600,
      incident: "air",
      exit: "air",
      layers: [{ material: "film", thickness: 600 }],
      substrate: { material: "boro-crown", thicknessMm: 1, backside: true },
      materials: [{ id: "film", name: "film", role: "layer" as const, source: "test", model: { kind: "cauchy" as const, A: 1.95, B: 0.02, C: 0 } }],
    };
    const w = Array.from({ length: 201 }, (_, i) => 500 + i * 4);
    const T = computeSpectrum(d, { wavelengths: w }).u.T;
    const csv = "wavelength_nm,T\n" + w.map((x, i) => `${x},${(T[i]! * 100).toFixed(4)}`).join("\n");
    const before = count("materials");
    const res = await team.members.designer.agent
      .post(`${API}/materials/witness-fit`)
      .field("scale", "percent")
      .field("id", "film-run118")
      .field("name", "Witness film, run 118")
      .field("substrate", "boro-crown")
      .field("substrateThicknessMm", "1")
      .field("uncertaintyPct", "0.05")
      .field("minThicknessNm", "300")
      .field("maxThicknessNm", "1200")
      .attach("file", Buffer.from(csv), "witness.csv")
      .expect(201);
    expect(Math.abs(res.body.fit.thicknessNm - 600)).toBeLessThan(3);
    expect(count("materials")).toBe(before + 1);
    const list = await team.members.reviewer.agent.get(`${API}/materials`).expect(200);
    const m = list.body.items.find((x: { id: string }) => x.id === "film-run118");
    expect(m.source).toMatch(/residual RMS/);
    // the same id again: 409, nothing stored
    await team.members.designer.agent
      .post(`${API}/materials/witness-fit`)
      .field("scale", "percent")
      .field("id", "film-run118")
      .field("name", "again")
      .field("substrate", "boro-crown")
      .field("substrateThicknessMm", "1")
      .attach("file", Buffer.from(csv), "witness.csv")
      .expect(409);
    expect(count("materials")).toBe(before + 1);
  });
});
