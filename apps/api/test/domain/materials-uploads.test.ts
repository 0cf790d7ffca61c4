// Workspace materials from n,k tables, their use in designs, measured spectra, and bad uploads that store nothing.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { DESIGN_FORMAT } from "@stackproof/optics";
import { createTestServer, type TestServer } from "../support/context.ts";
import { API, createDesign, createProgram, createTeam, type Team } from "./fixtures.ts";

let server: TestServer;
let team: Team;
beforeAll(async () => {
  server = await createTestServer();
  team = await createTeam(server);
});
afterAll(async () => {
  await server.close();
});

const count = (table: string) =>
  (server.ctx.db.$client.prepare(`SELECT count(*) AS n FROM ${table}`).get() as { n: number }).n;

/** A dense hafnia-like film, n falling slowly with wavelength, no absorption (values invented for the test). */
const TABLE_NM = "wavelength_nm,n,k\n400,2.02,0\n500,1.99,0\n600,1.975,0\n700,1.965,0\n800,1.96,0\n";

describe("materials", () => {
  it("lists the built-in library", async () => {
    const res = await team.members.reviewer.agent.get(`${API}/materials`).expect(200);
    const ids = res.body.items.map((m: { id: string }) => m.id);
    expect(ids).toEqual(expect.arrayContaining(["SiO2", "Ta2O5", "TiO2", "MgF2", "boro-crown", "air"]));
    expect(res.body.items.every((m: { builtIn: boolean }) => m.builtIn)).toBe(true);
    await request(server.app).get(`${API}/materials`).expect(401);
  });

  it("stores an uploaded n,k table (nm) and lists it as a workspace material", async () => {
    const res = await team.members.designer.agent
      .post(`${API}/materials`)
      .field("id", "HfO2-lab")
      .field("name", "Hafnia, chamber 2")
      .field("role", "layer")
      .attach("file", Buffer.from(TABLE_NM), "hafnia.csv")
      .expect(201);
    expect(res.body).toMatchObject({ id: "HfO2-lab", builtIn: false, model: { kind: "table" } });
    expect(res.body.model.points[0]).toEqual([400, 2.02, 0]);
    const list = await team.members.reviewer.agent.get(`${API}/materials`).expect(200);
    expect(list.body.items.find((m: { id: string }) => m.id === "HfO2-lab")).toMatchObject({
      builtIn: false,
      name: "Hafnia, chamber 2",
    });
  });

  it("converts wavelength_um to nm and treats a missing k column as 0", async () => {
    const res = await team.members.admin.agent
      .post(`${API}/materials`)
      .field("id", "SiO2-um")
      .field("name", "Silica in µm")
      .attach("file", Buffer.from("wavelength_um,n\n0.4,1.47\n0.6,1.46\n0.9,1.45\n"), "silica.csv")
      .expect(201);
    expect(res.body.model.points).toEqual([
      [400, 1.47, 0],
      [600, 1.46, 0],
      [900, 1.45, 0],
    ]);
  });

  it("lets designs of the workspace use it, embedding its constants in the revision", async () => {
    await team.members.designer.agent
      .post(`${API}/materials`)
      .field("id", "ZrO2-lab")
      .field("name", "Zirconia, chamber 1")
      .attach("file", Buffer.from(TABLE_NM), "zirconia.csv")
      .expect(201);
    const program = await createProgram(team);
    const stack = {
      format: DESIGN_FORMAT,
      name: "With a lab material",
      referenceWavelength: 550,
      layers: [
        { material: "ZrO2-lab", thickness: 69 },
        { material: "MgF2", thickness: 99.6 },
      ],
      substrate: { material: "boro-crown", thicknessMm: 1, backside: false },
    };
    const { revision } = await createDesign(team, program.id, stack as never);
    const full = await team.members.reviewer.agent.get(`${API}/revisions/${revision.id}`).expect(200);
    expect(full.body.stack.materials.map((m: { id: string }) => m.id)).toEqual(["ZrO2-lab"]);
    expect(typeof full.body.nominal.pass).toBe("boolean");
    // the design import resolves workspace materials too
    const imported = await team.members.designer.agent
      .post(`${API}/imports/design`)
      .attach("file", Buffer.from("material,thickness_nm\nZrO2-lab,69\nMgF2,99.6\n"), "lab.csv")
      .expect(200);
    expect(imported.body.stack.materials[0].id).toBe("ZrO2-lab");
  });

  it("refuses a built-in id and a taken id (409), reviewers (403), and no session (401)", async () => {
    const builtIn = await team.members.designer.agent
      .post(`${API}/materials`)
      .field("id", "SiO2")
      .field("name", "Mine")
      .attach("file", Buffer.from(TABLE_NM), "x.csv")
      .expect(409);
    expect(builtIn.body.error.message).toContain("built-in");
    await team.members.designer.agent
      .post(`${API}/materials`)
      .field("id", "taken")
      .field("name", "A")
      .attach("file", Buffer.from(TABLE_NM), "a.csv")
      .expect(201);
    await team.members.designer.agent
      .post(`${API}/materials`)
      .field("id", "taken")
      .field("name", "B")
      .attach("file", Buffer.from(TABLE_NM), "b.csv")
      .expect(409);
    await team.members.reviewer.agent
      .post(`${API}/materials`)
      .field("id", "r")
      .field("name", "r")
      .attach("file", Buffer.from(TABLE_NM), "r.csv")
      .expect(403);
    await request(server.app).post(`${API}/materials`).expect(401);
  });

  it("reports bad tables with row and column, refuses binary and oversize files, and stores nothing", async () => {
    const before = count("materials");
    const post = (csv: string | Buffer, name = "bad.csv") =>
      team.members.designer.agent
        .post(`${API}/materials`)
        .field("id", "bad-one")
        .field("name", "Bad")
        .attach("file", Buffer.isBuffer(csv) ? csv : Buffer.from(csv), name);

    const cell = await post("wavelength_nm,n,k\n400,2.0,0\n500,two,0\n600,1.9,-0.1\n").expect(422);
    expect(cell.body.error.code).toBe("invalid_csv");
    expect(cell.body.error.details).toEqual([
      { row: 3, column: "n", message: 'expected a number, got "two"' },
      { row: 4, column: "k", message: "expected a number ≥ 0, got -0.1" },
    ]);
    const cols = await post("lambda,n,k\n400,2,0\n500,2,0\n").expect(422);
    expect(cols.body.error.details).toEqual(
      expect.arrayContaining([
        expect.objectContaining({ row: 1, column: "lambda" }),
        expect.objectContaining({ row: 1, column: "wavelength_nm|wavelength_um" }),
      ]),
    );
    const both = await post("wavelength_nm,wavelength_um,n\n400,0.4,2\n500,0.5,2\n").expect(422);
    expect(both.body.error.details[0].message).toContain("only one of");
    const order = await post("wavelength_nm,n\n500,2\n400,2\n").expect(422);
    expect(order.body.error.details[0]).toMatchObject({ row: 3, column: "wavelength_nm" });
    const short = await post("wavelength_nm,n,k\n400,2\n500,2,0\n").expect(422);
    expect(short.body.error.details[0]).toMatchObject({
      row: 2,
      column: "-",
      message: "expected 3 cells, got 2",
    });
    const quote = await post('wavelength_nm,n\n400,"2\n').expect(422);
    expect(quote.body.error.details[0].row).toBeGreaterThanOrEqual(2);
    await post("wavelength_nm,n\n").expect(422);
    const bin = await post(Buffer.from([0x50, 0x4b, 0x03, 0x04, 0x00, 0x00, 0x08]), "x.zip").expect(415);
    expect(bin.body.error.code).toBe("binary_file");
    const big = await post(Buffer.alloc(1024 * 1024 + 1, "1"), "big.csv").expect(413);
    expect(big.body.error.code).toBe("payload_too_large");
    const noFile = await team.members.designer.agent
      .post(`${API}/materials`)
      .field("id", "nofile")
      .field("name", "No file")
      .expect(400);
    expect(noFile.body.error.code).toBe("file_missing");
    const badId = await team.members.designer.agent
      .post(`${API}/materials`)
      .field("id", "has space")
      .field("name", "x")
      .attach("file", Buffer.from(TABLE_NM), "x.csv")
      .expect(400);
    expect(badId.body.error.code).toBe("validation_failed");
    expect(count("materials")).toBe(before);
  });
});

describe("measured spectra", () => {
  it("attaches a measured R spectrum to a revision and lists it with its points", async () => {
    const program = await createProgram(team);
    const { revision } = await createDesign(team, program.id);
    const res = await team.members.designer.agent
      .post(`${API}/revisions/${revision.id}/measurements`)
      .field("label", "Run 42 witness")
      .field("angleDeg", "8")
      .field("polarization", "u")
      .attach(
        "file",
        Buffer.from("# spectrophotometer export\nwavelength_nm,R\n500,1.4\n550,1.3\n600,1.45\n"),
        "run42.csv",
      )
      .expect(201);
    expect(res.body).toMatchObject({
      label: "Run 42 witness",
      quantity: "R",
      angleDeg: 8,
      polarization: "u",
      wavelengths: [500, 550, 600],
      values: [1.4, 1.3, 1.45],
    });
    const list = await team.members.reviewer.agent
      .get(`${API}/revisions/${revision.id}/measurements`)
      .expect(200);
    expect(list.body.items).toHaveLength(1);
    const t = await team.members.designer.agent
      .post(`${API}/revisions/${revision.id}/measurements`)
      .attach("file", Buffer.from("wavelength_nm,T\n500,98.1\n600,98.4\n"), "t.csv")
      .expect(201);
    expect(t.body).toMatchObject({ quantity: "T", label: "t.csv", angleDeg: 0 });
  });

  it("refuses bad spectra with the row and column and stores nothing", async () => {
    const program = await createProgram(team);
    const { revision } = await createDesign(team, program.id);
    const before = count("measurements");
    const post = (csv: string | Buffer) =>
      team.members.designer.agent
        .post(`${API}/revisions/${revision.id}/measurements`)
        .attach("file", Buffer.isBuffer(csv) ? csv : Buffer.from(csv), "m.csv");
    // every refusal of the spectrophotometer reader is in spectrum-upload.test.ts; two here
    const both = await post("wavelength_nm,R,T\n500,1,99\n600,1,99\n").expect(422);
    expect(both.body.error.details[0].message).toContain("expected one spectrum column");
    const cell = await post("wavelength_nm,T\n500,98\n550,n/a\n600,97\n").expect(422);
    expect(cell.body.error.details).toEqual([
      { row: 3, column: "T", message: 'expected a number, got "n/a"' },
    ]);
    await post(Buffer.from([0xff, 0xfe, 0x00, 0x41])).expect(415);
    await post(Buffer.alloc(2 * 1024 * 1024, "9")).expect(413);
    expect(count("measurements")).toBe(before);
    await team.members.reviewer.agent
      .post(`${API}/revisions/${revision.id}/measurements`)
      .attach("file", Buffer.from("wavelength_nm,T\n500,98\n600,97\n"), "m.csv")
      .expect(403);
    await team.members.designer.agent
      .post(`${API}/revisions/nope/measurements`)
      .attach("file", Buffer.from("wavelength_nm,T\n500,98\n600,97\n"), "m.csv")
      .expect(404);
    await team.members.designer.agent.get(`${API}/revisions/nope/measurements`).expect(404);
    await request(server.app).get(`${API}/revisions/${revision.id}/measurements`).expect(401);
  });
});
