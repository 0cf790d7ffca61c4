// The program manager at the release gate of a revision under review: a blocking thread holds the sign-off;
// once it is resolved every condition is met and the sign-off goes through — against the built product.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO, openBrowser, signInAs, startProduct, type BrowserSession, type Product } from "./support/harness.ts";

let product: Product;
let browser: BrowserSession;

beforeAll(async () => {
  product = await startProduct();
  browser = await openBrowser({ width: 1280, height: 900 });
  await signInAs(browser.page, product.url, DEMO.approver);
});

afterAll(async () => {
  await browser?.close();
  await product?.stop();
});

describe("release gate on the workspace (approver)", () => {
  it("blocks the sign-off while a blocking thread is open", async () => {
    const { page } = browser;
    await page.goto(product.url);
    await page.locator("table").getByRole("link", { name: "Kestrel receiver bandpass" }).click();
    await page.waitForURL(/\/revisions\//);
    await page.getByRole("heading", { name: /Kestrel receiver bandpass/ }).waitFor();
    await page.locator('[data-check="verified_yield"][data-ok="true"]').waitFor();

    const form = page.getByRole("form", { name: "Start a review thread" });
    await form.getByLabel("Pinned to").selectOption("design");
    await form.getByLabel("Severity").selectOption("blocking");
    await form.getByRole("combobox", { name: /Comment/ }).fill("Hold: confirm the cavity layer against the latest tooling calibration.");
    await form.getByRole("button", { name: "Start thread" }).click();
    await page.locator("[data-thread]").filter({ hasText: "Whole design" }).waitFor();

    await page.locator('[data-check="blocking_threads"][data-ok="false"]').waitFor();
    await expect.poll(() => page.getByRole("button", { name: "Sign off" }).isDisabled()).toBe(true);
    await browser.screenshot("workspace-7-approval-blocked");
  });

  it("allows the sign-off once the blocking thread is resolved", async () => {
    const { page } = browser;
    await page.locator("[data-thread]").filter({ hasText: "Whole design" }).getByRole("button", { name: "Resolve" }).click();
    await page.locator('[data-check="blocking_threads"][data-ok="true"]').waitFor();
    const signOff = page.getByRole("button", { name: "Sign off" });
    await expect.poll(() => signOff.isEnabled()).toBe(true);
    await browser.screenshot("workspace-8-approval-allowed");
    await signOff.click();
    const dialog = page.getByRole("dialog");
    await dialog.getByRole("button", { name: "Sign off" }).click();
    await page.getByRole("heading", { name: /Kestrel receiver bandpass/ }).getByText("Signed off").waitFor({ timeout: 20_000 });
    await browser.screenshot("workspace-9-signed-off");
    expect(browser.consoleErrors).toEqual([]);
  });
});
