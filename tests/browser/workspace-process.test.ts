// The process comparison in the workspace, against the built product: compare the yield of a design under
// independent errors, crystal control and optical monitoring in the process worker, and see the traces.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { compareProcesses, defaultMonitoringPlan, parseDesign } from "@stackproof/optics";
import type { Control, Design, ErrorModel, SpecMask } from "@stackproof/optics";
import { DEMO, openBrowser, signInAs, startProduct, type BrowserSession, type Product } from "./support/harness.ts";

let product: Product;
let browser: BrowserSession;

beforeAll(async () => {
  product = await startProduct();
  browser = await openBrowser({ width: 1280, height: 900 });
  await signInAs(browser.page, product.url, DEMO.designer);
});

afterAll(async () => {
  await browser?.close();
  await product?.stop();
});

describe("process comparison (designer)", () => {
  it("compares processes in a Web Worker with progress, then shows per-layer errors and monitoring traces", async () => {
    const { page } = browser;
    await page.goto(product.url);
    await page.locator("table").getByRole("link", { name: "Kestrel receiver bandpass" }).click();
    await page.waitForURL(/\/designs\/[^/]+\/revisions\/[^/]+$/);
    await page.getByRole("tab", { name: "Process" }).click();
    expect(await page.getByTestId("process-candidate").count()).toBe(3);
    await page.getByLabel("Trials per process").fill("300");
    await page.getByTestId("run-process-comparison").click();
    await page.getByTestId("process-results").waitFor({ timeout: 240_000 });
    expect(await page.getByTestId("process-yield-chart").locator("rect").count()).toBeGreaterThanOrEqual(3);
    expect(await page.getByTestId("process-layer-table").locator("tbody tr").count()).toBeGreaterThan(3);
    // browser result = server result: the same comparison in Node gives the same pass counts, trial for trial
    const revisionId = /\/revisions\/([^/]+)$/.exec(page.url())?.[1] ?? "";
    const data = await page.evaluate(async (id) => {
      const get = async (p: string) => (await fetch(`/api/v1${p}`, { credentials: "include" })).json();
      const revision = await get(`/revisions/${id}`);
      const design = await get(`/designs/${revision.designId}`);
      const program = await get(`/programs/${design.program.id}`);
      return { stack: revision.stack, mask: revision.specMask ?? program.specMask, errorModel: program.errorModel, seed: program.studyDefaults.seed };
    }, revisionId);
    const design = parseDesign(data.stack) as Design;
    const materials = [...new Set(design.layers.map((l) => l.material))].sort();
    const each = (c: Control): Record<string, Control> => Object.fromEntries(materials.map((m) => [m, c]));
    // the panel's default candidates (apps/web/src/features/process/lib/process-form.ts)
    const node = await compareProcesses(
      { design, mask: data.mask as SpecMask, errorModel: data.errorModel as ErrorModel, trials: 300, seed: data.seed as string, envelopeSamples: 0 },
      [
        null,
        { version: 1, label: "Quartz crystal", control: each({ method: "crystal", toolingPct: 0.5, noisePct: 0.5, terminationNm: 0.3 }) },
        { version: 1, label: "Optical monitoring", control: each({ method: "optical", signal: "T", noisePct: 0.3, detectionPct: 0.9, driftPct: 0, overshootNm: 0, overshootSigmaNm: 0.3 }), plan: defaultMonitoringPlan(design) },
      ],
    );
    const rows = page.getByTestId("process-yield-row");
    const browserCounts = await rows.evaluateAll((els) => els.map((e) => Number(e.getAttribute("data-pass-count"))));
    expect(browserCounts).toEqual(node.map((e) => e.result.passCount));
    await page.getByTestId("monitoring-traces").waitFor({ timeout: 60_000 });
    expect(await page.getByTestId("monitoring-traces").locator("svg").count()).toBeGreaterThan(3);
    await browser.screenshot("workspace-process");
    expect(browser.consoleErrors).toEqual([]);
  }, 300_000);

  it("cancels a running comparison", async () => {
    const { page } = browser;
    await page.getByLabel("Trials per process").fill("50000");
    await page.getByTestId("run-process-comparison").click();
    await page.getByTestId("process-progress").waitFor();
    await page.getByRole("button", { name: "Cancel" }).click();
    await page.getByText("Comparison cancelled.").waitFor();
  }, 120_000);
});
