// Pure helpers of the domain: canonical JSON, mentions, CSV readers, chunk sizes, verification.
import { describe, expect, it } from "vitest";
import { mergeYieldChunks, runYieldChunk, type YieldStudy } from "@stackproof/optics";
import { canonicalJson, revisionHash } from "../../src/domain/canonical.ts";
import { findMentions } from "../../src/domain/threads.ts";
import {
  CsvProblems,
  type CellProblem,
  parseIndexTable,
  parseLayerCsv,
  parseSingleSpectrum,
} from "../../src/uploads/csv.ts";
import { chunkSizeFor } from "../../src/yield/index.ts";
import { verifyClientResult } from "../../src/yield/verify.ts";
import { AR_MASK, ERROR_MODEL, singleLayerAr } from "./fixtures.ts";

describe("canonical JSON and the content hash", () => {
  it("sorts keys at every level and drops undefined members", () => {
    expect(canonicalJson({ b: 1, a: { d: [3, { z: 1, y: 2 }], c: undefined } })).toBe(
      '{"a":{"d":[3,{"y":2,"z":1}]},"b":1}',
    );
  });
  it("gives the same hash for the same content in any key order", () => {
    expect(revisionHash({ x: 1, y: [1, 2] }, { bands: [] })).toBe(
      revisionHash({ y: [1, 2], x: 1 }, { bands: [] }),
    );
    expect(revisionHash({ x: 1 }, { bands: [] })).not.toBe(revisionHash({ x: 2 }, { bands: [] }));
    expect(revisionHash({}, {})).toMatch(/^[0-9a-f]{64}$/);
  });
  it("hashes a mask with an empty colour list like one without it, and a non-empty list differently", () => {
    const box = { id: "c1", quantity: "R" };
    expect(revisionHash({ x: 1 }, { bands: [], colour: [] })).toBe(revisionHash({ x: 1 }, { bands: [] }));
    expect(revisionHash({ x: 1 }, { bands: [], colour: [box] })).not.toBe(
      revisionHash({ x: 1 }, { bands: [] }),
    );
  });
});

describe("mentions", () => {
  const members = [
    { id: "1", name: "Ilse Varga", email: "designer@halvorsen.example" },
    { id: "2", name: "Tobiah Renwick", email: "reviewer@halvorsen.example" },
    { id: "3", name: "Tobiah Lund", email: "t.lund@halvorsen.example" },
  ];
  const ids = (body: string) =>
    findMentions(body, members)
      .map((m) => m.id)
      .sort();
  it("matches e-mails, full names and unique first names at word boundaries", () => {
    expect(ids("@designer@halvorsen.example, please look")).toEqual(["1"]);
    expect(ids("Thanks @Ilse.")).toEqual(["1"]);
    expect(ids("@tobiah renwick and @Tobiah Lund")).toEqual(["2", "3"]);
    expect(ids("@Tobiah alone is ambiguous")).toEqual([]);
    expect(ids("@Ilsevarga is no one")).toEqual([]);
    expect(ids("mail ilse@example.org")).toEqual([]);
  });
});

describe("CSV readers", () => {
  const problems = (f: () => unknown) => {
    try {
      f();
    } catch (err) {
      if (err instanceof CsvProblems) return err.details as CellProblem[];
      throw err;
    }
    throw new Error("no problems reported");
  };
  it("reads n,k tables in nm or µm, with comments and blank lines", () => {
    expect(parseIndexTable("# measured\nwavelength_um,n,k\n\n0.5,1.5,0.001\n0.6,1.49,0\n")).toEqual([
      [500, 1.5, 0.001],
      [600, 1.49, 0],
    ]);
  });
  it("reports every bad cell with its file row and column", () => {
    expect(problems(() => parseIndexTable("wavelength_nm,n,k\n400,1e,0\n500,2,x\n"))).toEqual([
      { row: 2, column: "n", message: 'expected a number, got "1e"' },
      { row: 3, column: "k", message: 'expected a number, got "x"' },
    ]);
    expect(problems(() => parseLayerCsv("material,thickness_nm\nSiO2,-3\n", () => true))).toEqual([
      { row: 2, column: "thickness_nm", message: "expected a number ≥ 0, got -3" },
    ]);
    expect(
      problems(() => parseLayerCsv("material,thickness_nm,locked\nSiO2,3,maybe\n", () => true))[0],
    ).toMatchObject({ column: "locked" });
    expect(problems(() => parseSingleSpectrum("wavelength_nm,T\n500,50\n500,51\n", {}))[0]).toMatchObject({
      row: 3,
      column: "wavelength_nm",
    });
  });
  it("accepts R or T in any case and says which", () => {
    expect(parseSingleSpectrum("Wavelength_nm,r\n500,4.2\n600,4.1\n", {})).toMatchObject({
      quantity: "R",
      wavelengths: [500, 600],
      values: [4.2, 4.1],
    });
  });
});

describe("yield chunks and verification", () => {
  it("plans small fixed chunks (250 trials) so that runs interleave and stop quickly", () => {
    expect(chunkSizeFor(100)).toBe(100);
    expect(chunkSizeFor(2000)).toBe(250);
    expect(chunkSizeFor(200000)).toBe(250);
  });
  it("verifies only an exact match and lists every difference", () => {
    const study: YieldStudy = {
      design: singleLayerAr(),
      mask: AR_MASK,
      errorModel: ERROR_MODEL,
      trials: 60,
      seed: "unit",
    };
    const server = mergeYieldChunks(study, [runYieldChunk(study, 0, 60)]);
    const run = { trials: 60, seed: "unit", errorModel: ERROR_MODEL };
    expect(verifyClientResult(server, server, run)).toEqual({ verified: true, mismatch: null });
    const band = server.bandFailures[0];
    if (!band) throw new Error("no band");
    const off = {
      ...server,
      bandFailures: [{ ...band, count: band.count + 1 }, ...server.bandFailures.slice(1)],
      interval: { ...server.interval, low: server.interval.low + 1e-12 },
    };
    const v = verifyClientResult(server, off, run);
    expect(v.verified).toBe(false);
    expect(v.mismatch).toContain(`failures in band ${band.id}`);
    expect(v.mismatch).toContain("interval");
  });
});
