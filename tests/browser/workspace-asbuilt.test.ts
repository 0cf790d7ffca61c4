// The as-built loop in the built product: upload a lot of measured parts (semicolons, decimal comma, fractions —
// the reading is shown and confirmed), see per-part verdicts and the lot's yield, fit a part on the server, fit a
// measured spectrum in the browser's worker, and see predicted against actual yield on the program page.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { computeSpectrum } from "@stackproof/optics";
import { demoPrograms } from "../../apps/api/src/demo/designs.ts";
import {
  DEMO,
  openBrowser,
  signInAs,
  startProduct,
  type BrowserSession,
  type Product,
} from "./support/harness.ts";

let product: Product;
let browser: BrowserSession;

beforeAll(async () => {
  product = await startProduct();
  browser = await openBrowser({ width: 1280, height: 1000 });
  await signInAs(browser.page, product.url, DEMO.designer);
});

afterAll(async () => {
  await browser?.close();
  await product?.stop();
});

// The demo's Kestrel bandpass, revision 2 (apps/api/src/demo/designs.ts): three Ta2O5/SiO2 cavities with MgF2
// couplers under ZrO2/MgF2 blockers, ~100 layers. Its mask blocks over 400–1100 nm at 0° and at 10°, so a lot is
// measured at both angles (the 10° file is added to the lot through the API: the page uploads one angle per lot).
const kestrelProgram = demoPrograms().find((p) => p.key === "kestrel");
const kestrel = kestrelProgram?.revisions[1]?.stack;
if (!kestrel) throw new Error("no Kestrel demo design");
const layerCount = kestrel.layers.length;
const cavityLayers = kestrel.layers.filter((l) => l.material === "Ta2O5" || l.material === "SiO2").length;
const wl = Array.from({ length: 701 }, (_, i) => 400 + i);
const T = (scale: number, angleDeg = 0, wavelengths = wl) => {
  const d = { ...kestrel, layers: kestrel.layers.map((l) => ({ ...l, thickness: l.thickness * scale })) };
  return Array.from(computeSpectrum(d, { wavelengths, angleDeg }).u.T);
};
// Parts K-01 and K-03 as designed; K-02 with every layer 1.5 % thick (a tooling error on every material).
const lotCsv = (angleDeg: number) => {
  const good = T(1, angleDeg);
  const thick = T(1.015, angleDeg);
  return (
    "Wavelength (nm);K-01;K-02;K-03\n" +
    wl
      .map((w, i) =>
        [w, good[i]!, thick[i]!, good[i]!]
          .map((v) => String(typeof v === "number" && v < 2 ? v.toFixed(6) : v).replace(".", ","))
          .join(";"),
      )
      .join("\n")
  );
};

describe("as built (designer)", () => {
  it("uploads a lot, confirms how the file was read, and shows each part's verdict", async () => {
    const { page } = browser;
    await page.goto(product.url);
    await page.locator("table").getByRole("link", { name: "Kestrel receiver bandpass" }).click();
    await page.waitForURL(/\/designs\/[^/]+\/revisions\/[^/]+$/);
    await page.getByRole("tab", { name: "As built" }).click();
    const csv = lotCsv(0);
    const form = page.getByRole("form", { name: "Upload a lot" });
    await form
      .getByLabel(/Lot file/)
      .setInputFiles({ name: "run-118.csv", mimeType: "text/csv", buffer: Buffer.from(csv) });
    await form.getByText("How the file was read — confirm").waitFor();
    await expect(form.getByText(/Values look like fractions/).isVisible()).resolves.toBe(true);
    expect(await form.getByRole("radio", { name: "fractions" }).isChecked()).toBe(true);
    await form.getByLabel("Run id").fill("R-118");
    await form.getByLabel("Uncertainty, 1σ (pp)").fill("0.1");
    await form.getByRole("button", { name: "Upload lot" }).click();
    await page.getByRole("table", { name: "Lots" }).getByRole("button", { name: "R-118" }).waitFor();
    // Measured at 0° only, K-02 already fails its passband, but K-01 and K-03 are incomplete (the 10° blocking
    // bands are not measured) and do not count.
    await expect(page.getByRole("table", { name: "Lots" }).innerText()).resolves.toMatch(
      /0\/1 \(2 incomplete\)/,
    );
    // The same parts measured at 10°, added to the lot.
    const added = await page.evaluate(async (text) => {
      const get = async (p: string) => (await fetch(`/api/v1${p}`, { credentials: "include" })).json();
      const revisionId = /\/revisions\/([^/]+)$/.exec(location.pathname)?.[1] ?? "";
      const revision = await get(`/revisions/${revisionId}`);
      const design = await get(`/designs/${revision.designId}`);
      const lots = await get(`/programs/${design.program.id}/lots`);
      const lot = lots.items.find((l: { runId: string }) => l.runId === "R-118");
      const body = new FormData();
      body.set("file", new Blob([text], { type: "text/csv" }), "run-118-10deg.csv");
      for (const [k, v] of Object.entries({
        scale: "fraction",
        quantity: "T",
        angleDeg: "10",
        polarization: "u",
        uncertaintyPct: "0.1",
      }))
        body.set(k, v);
      const res = await fetch(`/api/v1/lots/${lot.id}/spectra`, {
        method: "POST",
        credentials: "include",
        body,
      });
      return res.status;
    }, lotCsv(10));
    expect(added).toBe(200);
    await page.reload();
    await page.getByRole("tab", { name: "As built" }).click();
    await page.getByRole("table", { name: "Lots" }).getByRole("button", { name: "R-118" }).click();
    const parts = page.getByTestId("lot-parts");
    await parts.waitFor();
    const rows = await parts.locator("tbody tr").allInnerTexts();
    expect(rows.find((r) => r.startsWith("K-01"))).toMatch(/pass/);
    expect(rows.find((r) => r.startsWith("K-02"))).toMatch(/fail/);
    await expect(page.getByRole("table", { name: "Lots" }).innerText()).resolves.toMatch(/2\/3/);
    await browser.screenshot("asbuilt-1-lot");
  });

  it("fits a part on the server and shows the chosen model and the layer errors", async () => {
    const { page } = browser;
    const parts = page.getByTestId("lot-parts");
    await parts.locator("tbody tr", { hasText: "K-02" }).getByRole("button", { name: "fit" }).click();
    const report = page.getByTestId("asbuilt-fit-report");
    await report.waitFor({ timeout: 90_000 });
    await expect(report.innerText()).resolves.toMatch(/Tooling \(thickness scale per material\) — chosen/);
    // both angles over 400–1100 nm at 0.1 pp: every material's tooling error comes back as the +1.5 % put in
    for (const material of ["Ta2O5", "SiO2", "MgF2", "ZrO2"])
      await expect(report.innerText()).resolves.toMatch(new RegExp(`tooling ${material}: \\+1\\.50 %`));
    await page.getByTestId("part-spectrum").first().waitFor();
    await browser.screenshot("asbuilt-2-part-fit");
  });

  it("fits a measured spectrum in a worker and flags what it cannot determine", async () => {
    const { page } = browser;
    // A quick passband scan of K-02: 880–910 nm at 0.5 nm, 0°.
    const scan = Array.from({ length: 61 }, (_, i) => 880 + i * 0.5);
    const thick = T(1.015, 0, scan);
    const csv = "wavelength_nm,T\n" + scan.map((w, i) => `${w},${(thick[i]! * 100).toFixed(4)}`).join("\n");
    const form = page.getByRole("form", { name: "Upload a measured spectrum" });
    await form
      .getByLabel(/CSV file/)
      .setInputFiles({ name: "k-02-T.csv", mimeType: "text/csv", buffer: Buffer.from(csv) });
    // the server's reading of the file is shown and its percent detection confirmed before anything is stored
    await form.getByText("How the file was read — confirm").waitFor();
    expect(await form.getByRole("radio", { name: "percent" }).isChecked()).toBe(true);
    await form.getByRole("button", { name: "Upload measurement" }).click();
    await page.getByRole("button", { name: /k-02-T · T · 0°/ }).waitFor();
    if ((await page.getByRole("button", { name: /k-02-T · T · 0°/ }).getAttribute("aria-pressed")) !== "true")
      await page.getByRole("button", { name: /k-02-T · T · 0°/ }).click();
    await page.getByRole("button", { name: "Fit the built part" }).click();
    const report = page.getByTestId("asbuilt-worker-fit");
    await report.waitFor({ timeout: 90_000 });
    await expect(report.innerText()).resolves.toMatch(/Tooling \(thickness scale per material\) — chosen/);
    // A passband scan alone at the default 0.2 pp cannot tell the cavities' Ta2O5 tooling from their SiO2 tooling
    // (the passband moves with both; correlated 100 %): the page says so for both and greys each of their layers
    // with the reason, never a number; the blockers' materials are determined, at the +1.5 % put in.
    const text = await report.innerText();
    expect(text).toMatch(/tooling Ta2O5: cannot be determined/);
    expect(text).toMatch(/tooling SiO2: cannot be determined/);
    expect(text).toMatch(/tooling MgF2: \+1\.50 %/);
    expect(text).toMatch(/tooling ZrO2: \+1\.50 %/);
    const shown = await report.locator('[data-determinable="true"]').count();
    const notDetermined = report.locator('[data-determinable="false"]');
    expect(await notDetermined.count()).toBe(cavityLayers);
    expect(shown).toBe(layerCount - cavityLayers);
    const titles = await notDetermined.locator("title").allTextContents();
    expect(titles).toHaveLength(cavityLayers);
    for (const title of titles) expect(title).toMatch(/\((Ta2O5|SiO2)\): cannot be determined — \S/);
    expect(browser.consoleErrors).toEqual([]);
    await browser.screenshot("asbuilt-3-worker-fit");
  });

  it("shows predicted against actual yield on the program page", async () => {
    const { page } = browser;
    await page
      .getByRole("link", { name: /Kestrel range sensor/ })
      .first()
      .click();
    await page.getByTestId("yield-history").waitFor();
    await expect(page.getByTestId("calibration").innerText()).resolves.toMatch(
      /Calibrated from 1 fitted parts of 1 runs/,
    );
    await browser.screenshot("asbuilt-4-program");
    expect(browser.consoleErrors).toEqual([]);
  });
});
