// A protective program's workspace: the caution is shown, and optical-density bands are drawn on the OD scale.
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

describe("protective program in the workspace", () => {
  it("shows the protective caution and the OD bands of the mask", async () => {
    const { page } = browser;
    await page.goto(product.url);
    await page.locator("table").getByRole("link", { name: "Merlin 532 notch" }).click();
    await page.waitForURL(/\/revisions\//);
    await page.getByRole("note", { name: "Protective filter caution" }).waitFor();
    expect(await page.getByRole("note", { name: "Protective filter caution" }).innerText()).toMatch(/not a certification/i);
    await page.getByTestId("spectrum-chart").waitFor();
    const od = page.getByRole("button", { name: "OD", exact: true });
    if ((await od.getAttribute("aria-pressed")) !== "true") await od.click();
    await page.locator('[data-curve="nominal-OD"]').waitFor();
    expect(await page.locator("[data-region]").count()).toBeGreaterThan(0);
    await browser.screenshot("workspace-12-protective-od");
    expect(browser.consoleErrors).toEqual([]);
  });
});
