// The single-spectrum upload (POST /revisions/:id/measurements) reads files with the same lenient
// spectrophotometer reader as lots: every accepted spelling stores the same spectrum (in percent), every refusal
// names its reason, and a refused upload stores nothing.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestServer, type TestServer } from "../support/context.ts";
import { API, createDesign, createProgram, createTeam, type Team } from "./fixtures.ts";

let server: TestServer;
let team: Team;
let revisionId: string;
beforeAll(async () => {
  server = await createTestServer();
  team = await createTeam(server);
  const program = await createProgram(team);
  revisionId = (await createDesign(team, program.id)).revision.id;
});
afterAll(async () => {
  await server.close();
});

const count = () =>
  (server.ctx.db.$client.prepare("SELECT count(*) AS n FROM measurements").get() as { n: number }).n;

function post(file: string, fields: Record<string, string> = {}) {
  let req = team.members.designer.agent.post(`${API}/revisions/${revisionId}/measurements`);
  for (const [k, v] of Object.entries(fields)) req = req.field(k, v);
  return req.attach("file", Buffer.from(file), "spectrum.csv");
}

describe("single-spectrum upload: accepted spellings", () => {
  // 500, 550, 600 nm: T = 97.5, 98.25, 96 %
  const expected = { quantity: "T", wavelengths: [500, 550, 600], values: [97.5, 98.25, 96] };
  const cases: [string, string, Record<string, string>][] = [
    [
      "comma-separated, wavelength_nm,T (the older format: percent proved by values above 1)",
      "wavelength_nm,T\n500,97.5\n550,98.25\n600,96\n",
      {},
    ],
    ["semicolon-separated with decimal commas", "Wavelength (nm);T (%)\n500;97,5\n550;98,25\n600;96\n", {}],
    ["tab-separated with a λ [nm] header and %T", "λ [nm]\t%T\n500\t97.5\n550\t98.25\n600\t96\n", {}],
    [
      "fractions with the scale confirmed",
      "wavelength,Transmittance\n500,0.975\n550,0.9825\n600,0.96\n",
      { scale: "fraction" },
    ],
    ["percent confirmed explicitly", "wavelength_nm,T\n500,97.5\n550,98.25\n600,96\n", { scale: "percent" }],
    ["wavelengths in µm", "wavelength_um,T\n0.5,97.5\n0.55,98.25\n0.6,96\n", {}],
    ["descending wavelengths (put in ascending order)", "nm,T\n600,96\n550,98.25\n500,97.5\n", {}],
    [
      "comments, CRLF line ends and a byte-order mark",
      "\uFEFF# Lambda 950 export\r\nwavelength_nm,T\r\n500,97.5\r\n550,98.25\r\n600,96\r\n",
      {},
    ],
    [
      "a column named by the user with the quantity given as a field",
      "wavelength_nm,witness 7\n500,97.5\n550,98.25\n600,96\n",
      { quantity: "T" },
    ],
  ];
  for (const [name, file, fields] of cases) {
    it(name, async () => {
      const res = await post(file, fields).expect(201);
      expect(res.body).toMatchObject(expected);
    });
  }
  it("R spectra are read as R (header Reflectance [%])", async () => {
    const res = await post("Wavelength;Reflectance [%]\n500;1,4\n600;1,45\n").expect(201);
    expect(res.body).toMatchObject({ quantity: "R", wavelengths: [500, 600], values: [1.4, 1.45] });
  });
});

describe("single-spectrum upload: refusals store nothing", () => {
  const refusals: [string, string, Record<string, string>, number, RegExp][] = [
    ["no wavelength column", "energy_eV,T\n2.5,97\n2.2,98\n", {}, 422, /no wavelength column/],
    [
      "two spectrum columns (a lot, not one spectrum)",
      "wavelength_nm,R,T\n500,1,99\n600,1,99\n",
      {},
      422,
      /expected one spectrum column .* got 2/,
    ],
    ["no spectrum column", "wavelength_nm\n500\n600\n", {}, 422, /no spectrum column/],
    [
      "a cell that is not a number",
      "wavelength_nm,T\n500,98\n550,n/a\n600,97\n",
      {},
      422,
      /expected a number, got "n\/a"/,
    ],
    [
      "a percentage above 100",
      "wavelength_nm,T\n500,98\n600,140\n",
      {},
      422,
      /expected a percentage between 0 and 100, got 140/,
    ],
    [
      "percent values sent as fractions",
      "wavelength_nm,T\n500,98\n600,97\n",
      { scale: "fraction" },
      422,
      /expected a fraction between 0 and 1, got 98 \(is the file in percent\?\)/,
    ],
    [
      "fractions (or a dark part in percent) without a confirmed scale",
      "wavelength_nm,T\n500,0.98\n600,0.97\n",
      {},
      400,
      /body\.scale: every value lies between 0 and 1/,
    ],
    [
      "a column that does not say R or T, without a quantity",
      "wavelength_nm,signal\n500,98\n600,97\n",
      {},
      400,
      /body\.quantity: the column "signal" does not say/,
    ],
    [
      "a header that contradicts the quantity field",
      "wavelength_nm,T\n500,98\n600,97\n",
      { quantity: "R" },
      422,
      /reads as T but the upload says quantity R/,
    ],
    [
      "a decimal comma with comma separators",
      "wavelength_nm,T\n500,97,5\n600,96,1\n",
      {},
      422,
      /expected 2 cells, got 3 \(a decimal comma needs ; or tab as the separator\)/,
    ],
    [
      "repeated wavelengths",
      "wavelength_nm,T\n500,98\n500,97\n",
      {},
      422,
      /strictly ascending or strictly descending/,
    ],
    [
      "wavelengths that go up and down",
      "wavelength_nm,T\n500,98\n600,97\n550,96\n",
      {},
      422,
      /strictly ascending or strictly descending/,
    ],
    ["a single data row", "wavelength_nm,T\n500,98\n", {}, 422, /at least 2 data rows/],
    [
      "a negative wavelength",
      "wavelength_nm,T\n-500,98\n600,97\n",
      {},
      422,
      /expected a positive wavelength/,
    ],
    ["a row with a missing cell", "wavelength_nm,T\n500,98\n600\n", {}, 422, /expected 2 cells, got 1/],
    ["an unknown scale", "wavelength_nm,T\n500,98\n600,97\n", { scale: "permille" }, 400, /scale/],
  ];
  for (const [name, file, fields, status, message] of refusals) {
    it(name, async () => {
      const before = count();
      const res = await post(file, fields).expect(status);
      const text = [
        res.body.error.message,
        ...(res.body.error.details ?? []).map((d: { message: string }) => d.message),
      ].join(" | ");
      expect(text).toMatch(message);
      if (status === 422) {
        for (const d of res.body.error.details)
          expect(d).toMatchObject({ row: expect.any(Number), column: expect.any(String) });
      }
      expect(count()).toBe(before);
    });
  }
  it("binary and oversize files", async () => {
    const before = count();
    await team.members.designer.agent
      .post(`${API}/revisions/${revisionId}/measurements`)
      .attach("file", Buffer.from([0xff, 0xfe, 0x00, 0x41]), "m.csv")
      .expect(415);
    await team.members.designer.agent
      .post(`${API}/revisions/${revisionId}/measurements`)
      .attach("file", Buffer.alloc(2 * 1024 * 1024, "9"), "m.csv")
      .expect(413);
    expect(count()).toBe(before);
  });
});
