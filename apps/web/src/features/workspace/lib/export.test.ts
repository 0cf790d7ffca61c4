// CSV export against formula injection. Rules: OWASP "CSV Injection" (cells starting with =, +, -, @, tab or
// carriage return get a leading single quote) and RFC 4180 quoting (comma, quote, line break → quoted, "" inside).
import { describe, expect, it } from "vitest";
import type { Design } from "@stackproof/optics";
import { csvCell, designToCsv } from "./export.ts";

describe("csvCell", () => {
  it("neutralises every formula-leading text cell with a single quote (OWASP CSV Injection)", () => {
    expect(csvCell('=HYPERLINK("http://evil.example")')).toBe(`"'=HYPERLINK(""http://evil.example"")"`);
    expect(csvCell("+cmd|' /C calc'!A0")).toBe("'+cmd|' /C calc'!A0");
    expect(csvCell("-2+3")).toBe("'-2+3");
    expect(csvCell("@SUM(A1)")).toBe("'@SUM(A1)");
    expect(csvCell("\t=1")).toBe("'\t=1");
    expect(csvCell("\r=1")).toBe(`"'\r=1"`);
  });

  it("keeps numbers numeric: -1.5 is a number, not a formula (our decision, documented in DEVELOPERS.md)", () => {
    expect(csvCell(-1.5)).toBe("-1.5");
    expect(csvCell("-1.5")).toBe("-1.5");
    expect(csvCell("+2e-3")).toBe("+2e-3");
    expect(csvCell(123.4567)).toBe("123.4567");
    expect(csvCell(Number.NaN)).toBe("");
  });

  it("leaves ordinary text alone and quotes commas and quotes (RFC 4180)", () => {
    expect(csvCell("TiO2")).toBe("TiO2");
    expect(csvCell("a,b")).toBe('"a,b"');
    expect(csvCell('say "hi"')).toBe('"say ""hi"""');
  });
});

describe("designToCsv", () => {
  it("writes a formula-named material as inert text and keeps thickness numeric", () => {
    const design = {
      name: "x",
      referenceWavelength: 550,
      layers: [
        { material: "=1+1", thickness: 100.123456, locked: false },
        { material: "MgF2", thickness: 99.6, locked: true },
      ],
      substrate: { material: "BK7" },
    } as unknown as Design;
    expect(designToCsv(design)).toBe("material,thickness_nm,locked\n'=1+1,100.1235,false\nMgF2,99.6,true\n");
  });
});
