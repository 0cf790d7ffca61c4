// Chart and layer grid visible together while editing layers, at 1440×900 and 1280×800 (issue: the chart
// scrolled out of view while editing layers). Also: selecting a band titles the chart with its conditions.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { artifactsDir } from "./support/paths.ts";
import { DEMO, openBrowser, signInAs, startProduct, type BrowserSession, type Product } from "./support/harness.ts";

let product: Product;

beforeAll(async () => {
  product = await startProduct();
});

afterAll(async () => {
  await product?.stop();
});

describe("workspace layout", () => {
  for (const [width, height] of [[1440, 900], [1280, 800]] as const) {
    it(`keeps the chart in view beside the layer grid at ${width}×${height}`, async () => {
      let browser: BrowserSession | undefined;
      try {
        browser = await openBrowser({ width, height });
        const { page } = browser;
        await signInAs(page, product.url, DEMO.designer);
        await page.goto(product.url);
        await page.locator("table").getByRole("link", { name: "Kestrel receiver bandpass" }).click();
        await page.waitForURL(/\/designs\/[^/]+\/revisions\/[^/]+$/);
        await page.getByTestId("spectrum-chart").waitFor();
        const grid = page.getByRole("grid", { name: /Layers/ });
        await grid.waitFor();
        // edit position: the grid's first cell scrolled into view, as when a designer starts editing
        await page.locator('[data-cell="3:2"]').scrollIntoViewIfNeeded();
        await page.locator('[data-cell="3:2"]').click();
        const chart = await page.getByTestId("spectrum-chart").boundingBox();
        const cell = await page.locator('[data-cell="3:2"]').boundingBox();
        await page.screenshot({ path: `${artifactsDir}/screenshots/layout-${width}x${height}.png` });
        expect(chart).not.toBeNull();
        expect(cell).not.toBeNull();
        // the whole plot area is on screen and the edited cell is on screen below it
        expect(chart!.y).toBeGreaterThanOrEqual(0);
        expect(chart!.y + chart!.height).toBeLessThanOrEqual(height);
        expect(cell!.y).toBeGreaterThanOrEqual(chart!.y + chart!.height - 1);
        expect(cell!.y + cell!.height).toBeLessThanOrEqual(height);
        expect(browser.consoleErrors).toEqual([]);
      } finally {
        await browser?.close();
      }
    }, 120_000);
  }

  it("selecting a band shows its curve with a title naming angle, polarization or cone", async () => {
    let browser: BrowserSession | undefined;
    try {
      browser = await openBrowser({ width: 1440, height: 900 });
      const { page } = browser;
      await signInAs(page, product.url, DEMO.designer);
      await page.goto(product.url);
      await page.locator("table").getByRole("link", { name: "Kestrel receiver bandpass" }).click();
      await page.getByTestId("spectrum-chart").waitFor();
      const chip = page.getByRole("list", { name: "Spec bands" }).getByRole("button").first();
      await chip.click();
      await expect.poll(async () => (await page.getByTestId("chart-title").innerText()).trim()).toMatch(/°.*(unpolarized|s-polarized|p-polarized|s and p each)/);
      await page.screenshot({ path: `${artifactsDir}/screenshots/layout-band-selected.png` });
      await page.getByRole("button", { name: "R/T vs angle" }).click();
      await expect.poll(async () => (await page.getByTestId("chart-title").innerText()).trim()).toMatch(/against angle at \d+ nm/);
      expect(browser.consoleErrors).toEqual([]);
    } finally {
      await browser?.close();
    }
  }, 120_000);
});
