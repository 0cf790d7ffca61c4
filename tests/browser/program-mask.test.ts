// A program manager writes customer conditions into a new program's mask (an angle range for s and p each, a cone
// about a chief ray, a reflected-colour box); a designer's preview of a new design shows the colour verdict.
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
let designer: BrowserSession | undefined;

beforeAll(async () => {
  product = await startProduct();
  browser = await openBrowser({ width: 1400, height: 1000 });
});

afterAll(async () => {
  await designer?.close();
  await browser?.close();
  await product?.stop();
});

describe("program mask with conditions and colour", () => {
  it("creates the program from the form, shows the mask in words, and the colour verdict in a design preview", async () => {
    const { page } = browser;
    await signInAs(page, product.url, DEMO.approver);
    await page.goto(`${product.url}/programs/new`);
    const form = page.getByRole("form", { name: "New program" });
    await form.waitFor();
    await form.getByLabel(/^Name/).fill("Cabin display cover glass");
    // band 1: reflectance ≤ 1.5 % over 430–670 nm at every angle 0–30° (5° steps), s and p each
    await form.getByLabel("Band 1 start (nm)").fill("430");
    await form.getByLabel("Band 1 stop (nm)").fill("670");
    await form.getByLabel("Band 1 value").fill("1.5");
    await form.getByLabel("Band 1 polarization").selectOption("sp");
    await form.getByLabel("Band 1 incidence").selectOption("range");
    await form.getByLabel("Band 1 angles from (°)").fill("0");
    await form.getByLabel("Band 1 angles to (°)").fill("30");
    await form.getByLabel("Band 1 angle step (°)").fill("5");
    // band 2: average reflectance ≤ 1 % over an f/2 cone about a 10° chief ray
    await form.getByRole("button", { name: "Add band" }).click();
    await form.getByLabel("Band 2 start (nm)").fill("450");
    await form.getByLabel("Band 2 stop (nm)").fill("650");
    await form.getByLabel("Band 2 requirement").selectOption("avgMax");
    await form.getByLabel("Band 2 value").fill("1");
    await form.getByLabel("Band 2 incidence").selectOption("cone");
    await form.getByLabel("Band 2 chief ray (°)").fill("10");
    await form.getByLabel("Band 2 cone f-number").fill("2");
    // a reflected colour box that no AR with a strong residual tint meets: a*, b* within ±0.5
    await form.getByRole("button", { name: "Add colour requirement" }).click();
    await form.getByLabel("Colour 1 label").fill("Neutral reflection");
    await form.getByLabel("Colour 1 a* from").fill("-0.5");
    await form.getByLabel("Colour 1 a* to").fill("0.5");
    await form.getByLabel("Colour 1 b* from").fill("0.5");
    await form.getByLabel("Colour 1 b* to").fill("-0.5");
    await form.getByRole("button", { name: "Create program" }).click();
    // the form's own check, at the field; nothing saved
    await expect.poll(() => form.getByLabel("Colour 1 b* to").getAttribute("aria-invalid")).toBe("true");
    await form.getByLabel("Colour 1 b* from").fill("-0.5");
    await form.getByLabel("Colour 1 b* to").fill("0.5");
    await form.getByRole("button", { name: "Create program" }).click();

    await page.getByRole("heading", { level: 1, name: "Cabin display cover glass" }).waitFor();
    const mask = page.getByRole("table", { name: /Spec mask of/ });
    await mask.waitFor();
    expect(await mask.innerText()).toMatch(/0–30°, s and p each/);
    expect(await mask.innerText()).toMatch(/f\/2 cone \(14\.48° half-angle\) about 10°, unpolarized/);
    const colour = page.getByRole("list", { name: /colour requirements/ });
    expect(await colour.innerText()).toContain(
      "Colour of reflected light: CIE 1931 standard colorimetric observer (2°), CIE illuminant D65; angle of incidence 0°; unpolarized; CIELAB −0.5 ≤ a* ≤ 0.5 and −0.5 ≤ b* ≤ 0.5",
    );
    await browser.screenshot("program-mask-01-program");

    // a designer's preview of a new design under the program judges the colour with the bands
    const programUrl = page.url();
    expect(browser.consoleErrors).toEqual([]);
    designer = await openBrowser({ width: 1400, height: 1000 });
    const d = designer.page;
    await signInAs(d, product.url, DEMO.designer);
    await d.goto(programUrl);
    await d.getByRole("link", { name: "New design" }).click();
    await d.getByRole("form", { name: "New design" }).waitFor();
    const chip = d.locator('[data-colour-requirement="colour-1"]');
    await chip.waitFor();
    await expect
      .poll(() => chip.innerText())
      .toMatch(/(pass|fail)[\s\S]*Neutral reflection[\s\S]*L\* [\d.]+, a\* -?[\d.]+, b\* -?[\d.]+/);
    expect(await chip.getByRole("img", { name: /Swatch of Neutral reflection: #[0-9a-f]{6}/ }).count()).toBe(
      1,
    );
    expect(await chip.innerText()).toContain("reflected, D65, CIE 1931 2°, 0°, unpolarized");
    await designer.screenshot("program-mask-02-preview");
    expect(designer.consoleErrors).toEqual([]);
  });
});
