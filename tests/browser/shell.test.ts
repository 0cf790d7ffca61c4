// The built product starts as one process and serves the app shell without console errors.
import fs from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO, openBrowser, signInAs, startProduct, type BrowserSession, type Product } from "./support/harness.ts";

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
  it("sends a signed-out visitor to the sign-in page", async () => {
    const { page } = browser;
    await page.goto(product.url);
    await page.waitForURL((u) => u.pathname.startsWith("/sign-in"));
    await page.getByRole("button", { name: /sign in/i }).waitFor();
    await browser.screenshot("shell-sign-in");
    expect(browser.consoleErrors).toEqual([]);
  });

  it("serves the shell with a healthy API and no console errors once signed in", async () => {
    const { page } = browser;
    await signInAs(page, product.url, DEMO.admin);
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
