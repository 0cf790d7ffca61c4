// The reviewer's path: start threads from the chart (dragged wavelength range, with an @mention) and from a layer
// row, see their markers, resolve one — against the built product.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
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
  browser = await openBrowser({ width: 1280, height: 900 });
  await signInAs(browser.page, product.url, DEMO.reviewer);
});

afterAll(async () => {
  await browser?.close();
  await product?.stop();
});

describe("review threads (reviewer)", () => {
  it("starts a thread on a wavelength range dragged on the chart, mentioning the designer", async () => {
    const { page } = browser;
    await page.goto(product.url);
    await page.locator("table").getByRole("link", { name: "Aster 505 long-pass dichroic" }).click();
    await page.waitForURL(/\/revisions\//);
    const chart = page.getByTestId("spectrum-chart");
    await chart.waitFor();
    const box = await chart.boundingBox();
    if (!box) throw new Error("chart has no box");
    await page.mouse.move(box.x + box.width * 0.55, box.y + box.height * 0.5);
    await page.mouse.down();
    await page.mouse.move(box.x + box.width * 0.62, box.y + box.height * 0.5, { steps: 6 });
    await page.mouse.move(box.x + box.width * 0.7, box.y + box.height * 0.5, { steps: 6 });
    await page.mouse.up();
    const form = page.getByRole("form", { name: "Start a review thread" });
    await expect.poll(() => form.getByLabel("Pinned to").inputValue()).toBe("range");
    const from = Number(await form.getByLabel("From (nm)").inputValue());
    const to = Number(await form.getByLabel("To (nm)").inputValue());
    expect(to).toBeGreaterThan(from);

    const box2 = form.getByRole("combobox", { name: /Comment/ });
    await box2.click();
    await box2.pressSequentially("Ripple here is too deep at 45°, @Ils");
    await page.getByRole("option", { name: /Ilse Varga/ }).waitFor();
    await page.keyboard.press("Enter");
    await expect.poll(() => box2.inputValue()).toContain("@designer@halvorsen.example");
    await box2.pressSequentially("please look.");
    await browser.screenshot("workspace-5-review-new-thread");
    await form.getByRole("button", { name: "Start thread" }).click();

    const card = page.locator("[data-thread]").filter({ hasText: `${from}–${to} nm` });
    await card.waitFor();
    expect(await card.getAttribute("data-status")).toBe("open");
    expect(await card.innerText()).toMatch(/opened on r2/);
    await page.locator(`[data-marker="${await card.getAttribute("data-thread")}"]`).waitFor();
  });

  it("starts a thread on a layer row and marks the row", async () => {
    const { page } = browser;
    await page.locator('[data-cell="2:1"]').click();
    await page.getByRole("button", { name: "Thread on layer 3" }).click();
    const form = page.getByRole("form", { name: "Start a review thread" });
    await expect.poll(() => form.getByLabel("Pinned to").inputValue()).toBe("layer");
    await form.getByLabel("Severity").selectOption("advisory");
    await form
      .getByRole("combobox", { name: /Comment/ })
      .fill("This SiO2 layer carries most of the edge sensitivity.");
    await form.getByRole("button", { name: "Start thread" }).click();
    await page.locator("[data-thread]").filter({ hasText: "Layer 3" }).waitFor();
    await page.locator('[data-layer-row="2"] [aria-label="open review thread"]').waitFor();
  });

  it("starts a thread from a spec band beside the chart", async () => {
    const { page } = browser;
    // the band as the demo's Aster mask labels it (apps/api/src/demo/designs.ts)
    await page.getByRole("button", { name: "Thread: Excitation 440–485 nm: R avg ≥ 95 % at 45°" }).click();
    const form = page.getByRole("form", { name: "Start a review thread" });
    await expect.poll(() => form.getByLabel("Pinned to").inputValue()).toBe("band");
    await expect.poll(() => form.getByLabel(/^Band/).inputValue()).toBe("reflect");
    await form.getByLabel("Severity").selectOption("advisory");
    await form
      .getByRole("combobox", { name: /Comment/ })
      .fill("Average passes, but the 485 nm end sits close to the edge at 45°.");
    await form.getByRole("button", { name: "Start thread" }).click();
    const card = page
      .locator("[data-thread]")
      .filter({ hasText: "Band Excitation 440–485 nm: R avg ≥ 95 % at 45°" });
    await card.waitFor();
    expect(await card.locator("[data-anchor-passes]").getAttribute("data-anchor-passes")).toBe("true");
  });

  it("resolves a thread and finds it under all threads", async () => {
    const { page } = browser;
    const card = page.locator("[data-thread]").filter({ hasText: "Layer 3" });
    await card.getByRole("button", { name: "Resolve" }).click();
    await card.waitFor({ state: "detached" }); // the open list no longer shows it
    await page.getByRole("radio", { name: "All" }).click();
    const resolved = page.locator('[data-thread][data-status="resolved"]').filter({ hasText: "Layer 3" });
    await resolved.waitFor();
    await resolved.getByRole("button", { name: "Reopen" }).waitFor();
    await browser.screenshot("workspace-6-review-resolved");
    expect(browser.consoleErrors).toEqual([]);
  });
});
