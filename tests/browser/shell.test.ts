// The built product starts as one process and serves the app shell without console errors.
import fs from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openBrowser, startProduct, type BrowserSession, type Product } from "./support/harness.ts";

let product: Product;
let browser: BrowserSession;

beforeAll(async () => {
  product = await startProduct();
  browser = await openBrowser();
});

afterAll(async () => {
  await browser?.close();
  await product?.stop();
});

describe("the built product", () => {
  it("serves the shell with a healthy API and no console errors", async () => {
    const { page } = browser;
    await page.goto(product.url);
    await page.getByText("Stackproof").first().waitFor();
    await page.getByText(/server healthy/i).waitFor({ timeout: 15_000 });
    const file = await browser.screenshot("shell");
    expect(fs.statSync(file).size).toBeGreaterThan(1000);
    expect(browser.consoleErrors).toEqual([]);
  });

  it("serves client-side routes and the not-found page from the same process", async () => {
    const { page } = browser;
    await page.goto(`${product.url}/no/such/page`);
    await page.getByText(/nothing is deposited here/i).waitFor();
    await browser.screenshot("not-found");
  });

  it("answers unknown API routes with the JSON error shape", async () => {
    const res = await fetch(`${product.url}/api/v1/nope`);
    expect(res.status).toBe(404);
    expect(await res.json()).toMatchObject({ error: { code: "not_found" } });
  });
});
