// The gate's release step on the built product: a program manager signs off a reviewed revision, releases it,
// and follows the gate to the release record that was filed.
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
});

afterAll(async () => {
  await browser?.close();
  await product?.stop();
});

describe("frame: release through the gate (approver)", () => {
  it("a reviewer sees no sign-off or release buttons", async () => {
    const { page } = browser;
    await signInAs(page, product.url, DEMO.reviewer);
    await page.locator("table").getByRole("link", { name: "Kestrel receiver bandpass" }).click();
    await page.waitForURL(/\/revisions\//);
    const gate = page.getByTestId("release-gate");
    await gate.locator('[data-check="state"]').waitFor();
    await gate.getByRole("button", { name: "Send back for rework" }).waitFor();
    expect(await gate.getByRole("button", { name: "Sign off" }).count()).toBe(0);
    expect(await gate.getByRole("button", { name: "Release" }).count()).toBe(0);
    await browser.screenshot("frame-20-gate-reviewer");
    await browser.context.clearCookies();
  });

  it("signs off, releases, and opens the filed release record", async () => {
    const { page } = browser;
    await signInAs(page, product.url, DEMO.approver);
    await page
      .getByRole("region", { name: "Your queue" })
      .getByRole("link", { name: /Kestrel receiver bandpass/ })
      .click();
    await page.waitForURL(/\/revisions\//);
    const gate = page.getByTestId("release-gate");
    const signOff = gate.getByRole("button", { name: "Sign off" });
    await expect.poll(() => signOff.isEnabled(), { timeout: 15_000 }).toBe(true);
    await signOff.click();
    let dialog = page.getByRole("dialog", { name: "Sign off?" });
    await dialog.getByLabel("Decision note (optional)").fill("Meets the mask with margin; yield verified.");
    await dialog.getByRole("button", { name: "Sign off" }).click();
    await gate.getByText("Sign off: done.").waitFor();

    const release = gate.getByRole("button", { name: "Release" });
    await expect.poll(() => release.isEnabled(), { timeout: 15_000 }).toBe(true);
    await browser.screenshot("frame-21-gate-ready-to-release");
    await release.click();
    dialog = page.getByRole("dialog", { name: "Release?" });
    await dialog.getByRole("button", { name: "Release" }).click();
    await gate.getByText("Release: done.").waitFor();
    await browser.screenshot("frame-22-gate-released");

    await gate.getByRole("link", { name: "Open the release record" }).click();
    await page.waitForURL(/\/releases\//);
    await page.getByRole("heading", { level: 1, name: /Kestrel receiver bandpass r2/ }).waitFor();
    const decisions = page.locator(".release-decision");
    // the revision page's heading also reads "… r2": wait for the record itself before counting
    await decisions.first().waitFor();
    expect(await decisions.count()).toBeGreaterThanOrEqual(3);
    expect(await decisions.last().innerText()).toMatch(/Released by Sunniva Achterberg/);
    await page.getByText("Meets the mask with margin; yield verified.").waitFor();
    // The record states the evidence run's process in plain words (optics' describeProcess).
    expect(await page.getByTestId("error-model-words").textContent()).toContain(
      "optical monitoring (T), turning points at 905 nm on the part, 0.05 % photometric noise",
    );
    await page.getByTestId("error-model-words").scrollIntoViewIfNeeded();
    await browser.screenshot("frame-23-release-record-kestrel");

    // The home queue has moved on: nothing waits to be released any more.
    await page.goto(product.url);
    const queue = page.getByRole("region", { name: "Your queue" });
    await queue.getByText("Nothing is waiting to be released.").waitFor();
    expect(browser.consoleErrors).toEqual([]);
  });
});
