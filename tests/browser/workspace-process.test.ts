// The process comparison in the workspace, against the built product: compare the yield of a design under
// independent errors, crystal control and optical monitoring in the process worker, and see the traces.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
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
    await page.getByTestId("process-results").waitFor({ timeout: 120_000 });
    expect(await page.getByTestId("process-yield-chart").locator("rect").count()).toBeGreaterThanOrEqual(3);
    expect(await page.getByTestId("process-layer-table").locator("tbody tr").count()).toBeGreaterThan(3);
    await page.getByTestId("monitoring-traces").waitFor({ timeout: 60_000 });
    expect(await page.getByTestId("monitoring-traces").locator("svg").count()).toBeGreaterThan(3);
    await browser.screenshot("workspace-process");
    expect(browser.consoleErrors).toEqual([]);
  });

  it("cancels a running comparison", async () => {
    const { page } = browser;
    await page.getByLabel("Trials per process").fill("50000");
    await page.getByTestId("run-process-comparison").click();
    await page.getByTestId("process-progress").waitFor();
    await page.getByRole("button", { name: "Cancel" }).click();
    await page.getByText("Comparison cancelled.").waitFor();
  });
});
