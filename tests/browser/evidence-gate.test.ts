// The evidence on the built product: the gate shows the evidence run's point yield, lower bound, trials and
// confidence; a revision with a loosened mask shows its spec deviation and the gate holds until another approver
// accepts it; the release record downloads as a PDF.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import fs from "node:fs";
import { request, type APIRequestContext } from "playwright-core";
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
let designerApi: APIRequestContext;

beforeAll(async () => {
  product = await startProduct();
  browser = await openBrowser({ width: 1280, height: 1000 });
  designerApi = await request.newContext({ baseURL: product.url, extraHTTPHeaders: { Origin: product.url } });
  const signedIn = await designerApi.post("/api/v1/auth/sign-in", {
    data: { email: DEMO.designer, password: DEMO.password },
  });
  expect(signedIn.status()).toBe(200);
  await signInAs(browser.page, product.url, DEMO.approver);
});

afterAll(async () => {
  await designerApi?.dispose();
  await browser?.close();
  await product?.stop();
});

describe("evidence at the gate (approver)", () => {
  it("shows the evidence run's point yield, lower bound, trials and confidence", async () => {
    const { page } = browser;
    await page.goto(product.url);
    await page.locator("table").getByRole("link", { name: "Kestrel receiver bandpass" }).click();
    await page.waitForURL(/\/revisions\//);
    const evidence = page.getByTestId("gate-evidence");
    await evidence.getByTestId("evidence-bound").waitFor();
    expect(await evidence.getByTestId("evidence-bound").textContent()).toMatch(/^\d{1,3}\.\d{2} %$/);
    expect(await evidence.getByTestId("evidence-yield").textContent()).toMatch(/^\d{1,3}\.\d %$/);
    // The demo's bandpass program asks for 500 evidence trials at 95 % (apps/api/src/demo/designs.ts).
    expect(await evidence.getByTestId("evidence-trials").textContent()).toMatch(/\/ 500$/);
    expect(await evidence.textContent()).toContain("Lower bound (95 %)");
    // ... and states the run's process in plain words: cavities on 905 nm turning points, blockers on the crystal
    const model = await evidence.getByTestId("evidence-error-model").textContent();
    expect(model).toContain(
      "optical monitoring (T), turning points at 905 nm on the part, 0.05 % photometric noise",
    );
    expect(model).toContain("quartz-crystal control");
    await page.locator('[data-check="verified_yield"][data-ok="true"]').waitFor();
    await browser.screenshot("evidence-1-gate-bound");
  });

  it("shows a spec deviation, holds the gate until another approver accepts it", async () => {
    const { page } = browser;
    // The designer saves a revision of a new design whose mask loosens the program's (every limit relaxed by 5).
    const programs = await (await designerApi.get("/api/v1/programs")).json();
    const aster = programs.items.find((p: { name: string }) => /Aster/.test(p.name)) ?? programs.items[0];
    const program = await (await designerApi.get(`/api/v1/programs/${aster.id}`)).json();
    const design = program.designs[0];
    const revs = await (await designerApi.get(`/api/v1/designs/${design.design.id}`)).json();
    const latest = await (await designerApi.get(`/api/v1/revisions/${revs.revisions[0].id}`)).json();
    const loosened = {
      bands: program.specMask.bands.map((b: { requirement: string; value: number }) => ({
        ...b,
        value: b.requirement === "min" || b.requirement === "avgMin" ? b.value - 5 : b.value + 5,
      })),
    };
    const created = await designerApi.post(`/api/v1/programs/${aster.id}/designs`, {
      data: { name: "Aster loosened", stack: latest.stack, specMask: loosened, note: "looser copy" },
    });
    expect(created.status(), await created.text()).toBe(201);
    const { design: d2, revision: r2 } = await created.json();
    const asked = await designerApi.post(`/api/v1/revisions/${r2.id}/deviations`, {
      data: { reason: "The customer accepts 5 points of slack for the pilot lot." },
    });
    expect(asked.status(), await asked.text()).toBe(201);

    await page.goto(`${product.url}/designs/${d2.id}/revisions/${r2.id}`);
    const deviation = page.getByTestId("gate-deviation");
    await deviation.waitFor();
    expect(await deviation.getByTestId("deviation-status").textContent()).toBe("pending");
    expect(await deviation.textContent()).toContain("The customer accepts 5 points of slack");
    await page.locator('[data-check="spec_deviation"][data-ok="false"]').waitFor();
    await browser.screenshot("evidence-2-deviation-pending");

    await deviation.getByRole("button", { name: "Accept the deviation" }).click();
    await page.locator('[data-check="spec_deviation"][data-ok="true"]').waitFor();
    expect(await deviation.getByTestId("deviation-status").textContent()).toBe("accepted");
    expect(await deviation.textContent()).toMatch(/Accepted by: .+/);
    await browser.screenshot("evidence-3-deviation-accepted");
  });

  it("downloads the release record as a PDF", async () => {
    const { page } = browser;
    const list = await (await page.request.get(`${product.url}/api/v1/releases`)).json();
    const releaseId = list.items[0].id as string;
    await page.goto(`${product.url}/releases/${releaseId}`);
    await page.getByTestId("release-evidence").waitFor();
    await page.getByTestId("release-plot").first().waitFor();
    await browser.screenshot("evidence-4-release-record");
    const [download] = await Promise.all([
      page.waitForEvent("download"),
      page.getByTestId("release-pdf").click(),
    ]);
    expect(download.suggestedFilename()).toMatch(/^release-.*\.pdf$/);
    const file = await download.path();
    const bytes = fs.readFileSync(file);
    expect(bytes.subarray(0, 5).toString("latin1")).toBe("%PDF-");
    expect(bytes.length).toBeGreaterThan(5000);
    expect(browser.consoleErrors).toEqual([]);
  });
});
