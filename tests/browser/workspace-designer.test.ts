// The designer's path through the workspace, against the built product: open a design, edit a layer and see the
// curve change, run a tolerance study in the browser's worker pool, verify it on the server.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
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

const curve = '[data-curve="nominal-T"]';

describe("design workspace (designer)", () => {
  it("opens a design at its latest revision", async () => {
    const { page } = browser;
    await page.goto(product.url);
    await page.locator("table").getByRole("link", { name: "Kestrel receiver bandpass" }).click();
    await page.waitForURL(/\/designs\/[^/]+\/revisions\/[^/]+$/);
    await page.getByTestId("spectrum-chart").waitFor();
    await page.locator(curve).waitFor();
    await page.getByRole("grid", { name: /Layers/ }).waitFor();
    await browser.screenshot("workspace-1-open");
    expect(browser.consoleErrors).toEqual([]);
  });

  it("edits a layer from the keyboard and redraws the curve; undo restores it", async () => {
    const { page } = browser;
    const before = await page.locator(curve).getAttribute("d");
    const cell = page.locator('[data-cell="3:2"]');
    const old = (await cell.innerText()).trim();
    await cell.click();
    // Time from the key that commits the edit to the new path, measured inside the page.
    await page.evaluate((sel) => {
      const w = window as unknown as { __edit?: { start: number; end: number } };
      const path = document.querySelector(sel) as SVGPathElement;
      w.__edit = { start: 0, end: 0 };
      document.addEventListener("keydown", (e) => { if (e.key === "Enter" && w.__edit && w.__edit.start === 0 && document.activeElement?.tagName === "INPUT") w.__edit.start = performance.now(); }, { capture: true });
      new MutationObserver(() => { if (w.__edit && w.__edit.end === 0 && w.__edit.start > 0) w.__edit.end = performance.now(); }).observe(path, { attributes: true, attributeFilter: ["d"] });
    }, curve);
    await page.keyboard.press("Enter");
    const input = page.getByRole("textbox", { name: "Thickness of layer 4 in nm" });
    await input.fill(String(Number(old) * 1.15));
    await page.keyboard.press("Enter");
    await page.waitForFunction(([sel, b]) => document.querySelector(sel as string)?.getAttribute("d") !== b, [curve, before]);
    const after = await page.locator(curve).getAttribute("d");
    expect(after).not.toBe(before);
    const ms = await page.evaluate(() => {
      const e = (window as unknown as { __edit: { start: number; end: number } }).__edit;
      return e.end - e.start;
    });
    console.log(`edit → new curve in the page: ${ms.toFixed(1)} ms`);
    await page.getByTestId("unsaved").waitFor();
    await browser.screenshot("workspace-2-edited");

    await page.locator('[data-cell="3:2"]').focus();
    await page.keyboard.press("Control+z");
    await page.waitForFunction(([sel, b]) => document.querySelector(sel as string)?.getAttribute("d") === b, [curve, before]);
    await page.getByTestId("unsaved").waitFor({ state: "detached" });
  });

  it("runs a tolerance study in the browser and shows the yield with its interval", async () => {
    const { page } = browser;
    await page.getByRole("tab", { name: "Tolerance study" }).click();
    await page.getByLabel("Trials").fill("300");
    await page.getByLabel("Seed").fill("browser-check");
    await page.getByRole("button", { name: "Run study in the browser" }).click();
    const yieldBox = page.getByTestId("browser-yield");
    await yieldBox.waitFor({ timeout: 60_000 });
    const text = await yieldBox.innerText();
    expect(text).toMatch(/\d+\.\d %/);
    expect(text).toMatch(/of 300 builds pass/);
    await page.getByTestId("margin-histogram").waitFor();
    await page.locator("[data-envelope]").first().waitFor();
    await browser.screenshot("workspace-3-study");
  });

  it("verifies the browser result on the server and shows the match", async () => {
    const { page } = browser;
    await page.getByRole("button", { name: "Verify on server" }).click();
    const server = page.getByTestId("server-result");
    await server.waitFor({ timeout: 90_000 });
    await page.locator('[data-verdict="match"]').waitFor();
    const browserYield = (await page.getByTestId("browser-yield").innerText()).match(/(\d+\.\d) %/)?.[1];
    expect(await server.innerText()).toContain(`${browserYield} %`);
    await server.scrollIntoViewIfNeeded();
    await browser.screenshot("workspace-4-verified");
    expect(browser.consoleErrors).toEqual([]);
  });

  it("imports a 60-layer CSV stack and redraws 1000 wavelengths after a one-layer edit", async () => {
    const { page } = browser;
    const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "stackproof-import-")), "sixty-layers.csv");
    const rows = Array.from({ length: 60 }, (_, i) => (i % 2 === 0 ? "Ta2O5,106.2,false" : "SiO2,155.6,false"));
    fs.writeFileSync(file, ["material,thickness_nm,locked", ...rows].join("\n") + "\n");
    await page.locator("#design-import").setInputFiles(file);
    await page.getByText(/Imported 60 layers from sixty-layers.csv/).waitFor();
    await page.getByText("60 layers", { exact: false }).first().waitFor();
    const before = await page.locator(curve).getAttribute("d");
    expect(before?.split("L").length).toBe(1000); // one M and 999 L commands
    // Five edits of different layers; each timed inside the page from the committing Enter to the new path.
    const times: number[] = [];
    for (const [k, layer] of [10, 20, 30, 40, 50].entries()) {
      const prev = await page.locator(curve).getAttribute("d");
      await page.locator(`[data-cell="${layer}:2"]`).click();
      await page.evaluate((sel) => {
        const w = window as unknown as { __edit60?: { start: number; end: number } };
        const p = document.querySelector(sel) as SVGPathElement;
        const t = { start: 0, end: 0 };
        w.__edit60 = t;
        const onKey = (e: KeyboardEvent) => {
          if (e.key === "Enter" && t.start === 0 && document.activeElement?.tagName === "INPUT") t.start = performance.now();
        };
        document.addEventListener("keydown", onKey, { capture: true });
        const mo = new MutationObserver(() => {
          if (t.end === 0 && t.start > 0) {
            t.end = performance.now();
            mo.disconnect();
            document.removeEventListener("keydown", onKey, { capture: true });
          }
        });
        mo.observe(p, { attributes: true, attributeFilter: ["d"] });
      }, curve);
      await page.keyboard.press("Enter");
      await page.getByRole("textbox", { name: `Thickness of layer ${layer + 1} in nm` }).fill(String(110 + k));
      await page.keyboard.press("Enter");
      await page.waitForFunction(([sel, b]) => document.querySelector(sel as string)?.getAttribute("d") !== b, [curve, prev]);
      times.push(await page.evaluate(() => {
        const e = (window as unknown as { __edit60: { start: number; end: number } }).__edit60;
        return e.end - e.start;
      }));
    }
    const sorted = [...times].sort((x, y) => x - y);
    console.log(`60 layers × 1000 wavelengths, edit → new curve in the page: median ${sorted[2]?.toFixed(1)} ms, min ${sorted[0]?.toFixed(1)} ms, all ${times.map((t) => t.toFixed(1)).join(", ")}`);
    await browser.screenshot("workspace-10-sixty-layers");
    fs.rmSync(path.dirname(file), { recursive: true, force: true });
    expect(browser.consoleErrors).toEqual([]);
  });

  it("asks before a link throws the unsaved stack away, and keeps it on request", async () => {
    const { page } = browser;
    const here = page.url();
    await page.getByTestId("unsaved").waitFor();
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Overview" }).first().click();
    const dialog = page.getByRole("dialog", { name: "Leave with unsaved edits?" });
    await dialog.waitFor();
    await browser.screenshot("workspace-10b-unsaved-guard");
    await dialog.getByRole("button", { name: "Keep editing" }).click();
    await dialog.waitFor({ state: "detached" });
    expect(page.url()).toBe(here);
    await page.getByTestId("unsaved").waitFor();
    expect(await page.getByRole("grid", { name: /Layers/ }).getByRole("row").count()).toBe(61);
  });

  it("saves the edited stack as a new revision and compares it with the one before", async () => {
    const { page } = browser;
    const from = page.url();
    await page.getByLabel("Note for the new revision").fill("Sixty-layer trial stack from the import");
    await page.getByRole("button", { name: "Save as new revision" }).click();
    await page.waitForURL((u) => u.href !== from && /\/revisions\//.test(u.pathname));
    await page.getByRole("heading", { name: /Kestrel receiver bandpass/ }).getByText("r3").waitFor();
    await page.getByTestId("unsaved").waitFor({ state: "detached" });
    expect(await page.getByRole("grid", { name: /Layers/ }).getByRole("row").count()).toBe(61);

    await page.getByRole("tab", { name: /Revisions/ }).click();
    await page.getByLabel("Compare this revision with").selectOption({ label: "r2" });
    await page.getByRole("button", { name: "Compare" }).click();
    await page.waitForURL(/\/compare\?a=/);
    await page.getByTestId("diff-summary").waitFor();
    await page.locator('[data-curve^="a-"]').first().waitFor();
    await browser.screenshot("workspace-11-compare");
    expect(browser.consoleErrors).toEqual([]);
  });
});
