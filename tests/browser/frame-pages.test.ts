// The frame's pages against the real built server: program, release record (screen and print), materials,
// invitation through the outbox, and the tablet width.
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import {
  DEMO,
  openBrowser,
  signInAs,
  startProduct,
  type BrowserSession,
  type Product,
  mailedLink,
} from "./support/harness.ts";

let product: Product;
let browser: BrowserSession;
/** Every 4xx/5xx answer the pages received, to explain console errors. */
const refused: string[] = [];

beforeAll(async () => {
  product = await startProduct();
  browser = await openBrowser();
  browser.context.on("response", (r) => {
    if (r.status() >= 400) refused.push(`${r.status()} ${r.request().method()} ${new URL(r.url()).pathname}`);
  });
});

beforeEach(async () => {
  await browser.context.clearCookies();
});

afterAll(async () => {
  await browser?.close();
  await product?.stop();
});

describe("frame: pages", () => {
  it("program page of a protective program shows the caution, spec mask and error model", async () => {
    const { page } = browser;
    await signInAs(page, product.url, DEMO.designer);
    await page
      .getByRole("link", { name: /Merlin laser shield/ })
      .first()
      .click();
    await page.getByRole("heading", { level: 1, name: /Merlin laser shield/ }).waitFor();
    const caution = page.getByRole("note", { name: "Protective filter caution" });
    await caution.waitFor();
    expect(await caution.innerText()).toMatch(/not a certification/i);
    await page.getByRole("table", { name: /Spec mask of/ }).waitFor();
    await page.getByText("Process error model").waitFor();
    expect(await page.getByRole("link", { name: "New design" }).getAttribute("href")).toMatch(
      /^\/designs\/new\?program=/,
    );
    await browser.screenshot("frame-10-program-protective");
  });

  it("a release record opens from its program, prints black on white, and links the server's print page", async () => {
    const { page } = browser;
    await signInAs(page, product.url, DEMO.approver);
    await page
      .getByRole("link", { name: /Wren camera window/ })
      .first()
      .click();
    await page.getByRole("heading", { level: 1, name: /Wren camera window/ }).waitFor();
    await page.getByRole("link", { name: /Wren window AR r\d+/ }).click();
    await page.waitForURL((u) => u.pathname.startsWith("/releases/"));
    await page.getByRole("heading", { level: 1, name: /Wren window AR/ }).waitFor();
    for (const section of [
      "Identity",
      "Evidence",
      "Spectrum against the mask",
      "Spec deviations",
      "Spec mask and nominal result",
      "Layer stack",
      "Decisions",
      "Review threads",
    ]) {
      await page.getByRole("heading", { level: 2, name: section }).waitFor();
    }
    expect(await page.getByText(/Target 90 %: met/).count()).toBe(1);
    expect(await page.getByText(/Signed off/).count()).toBeGreaterThan(0);
    await browser.screenshot("frame-11-release-record");

    const printHref = await page.getByRole("link", { name: "Server print version" }).getAttribute("href");
    expect(printHref).toMatch(/^\/api\/v1\/releases\/.+\/print$/);
    const res = await page.request.get(`${product.url}${printHref}`);
    expect(res.status()).toBe(200);
    expect(res.headers()["content-type"]).toMatch(/text\/html/);

    await page.emulateMedia({ media: "print" });
    expect(await page.getByRole("button", { name: "Print" }).isVisible()).toBe(false);
    const colour = await page.getByRole("heading", { level: 1 }).evaluate((el) => getComputedStyle(el).color);
    expect(colour).toBe("rgb(0, 0, 0)");
    await browser.screenshot("frame-12-release-record-print");
    await page.emulateMedia({ media: "screen" });
  });

  it("materials: choosing one plots n and k; a bad CSV is refused with row and column", async () => {
    const { page } = browser;
    await signInAs(page, product.url, DEMO.designer);
    await page.getByRole("link", { name: "Materials" }).click();
    await page.getByRole("heading", { level: 1, name: "Materials" }).waitFor();
    await page.getByRole("button", { name: "Ta2O5", exact: true }).click();
    await page.getByRole("img", { name: /n and k of/ }).waitFor();
    expect(await page.getByText(/at 550 nm: n = /).innerText()).toMatch(/n = 2\.\d+/);

    await page.getByLabel("Material id").fill("TiO2-test");
    await page.getByLabel("Name").fill("titanium dioxide, test table");
    await page.getByLabel("n,k table (CSV)").setInputFiles({
      name: "bad.csv",
      mimeType: "text/csv",
      buffer: Buffer.from("wavelength_nm,n,k\n400,2.5,0\n500,abc,0\n450,2.4,0\n"),
    });
    await page.getByRole("button", { name: "Add to library" }).click();
    const problems = page.getByRole("table", { name: "Problems found in the file" });
    await problems.waitFor();
    expect(await problems.getByRole("row").count()).toBeGreaterThan(1);
    await browser.screenshot("frame-13-materials-upload-refused");

    await page.getByLabel("n,k table (CSV)").setInputFiles({
      name: "good.csv",
      mimeType: "text/csv",
      buffer: Buffer.from("wavelength_nm,n,k\n400,2.60,0.002\n500,2.45,0.001\n600,2.38,0\n700,2.34,0\n"),
    });
    await page.getByRole("button", { name: "Add to library" }).click();
    await page.getByText(/to the workspace library/).waitFor();
    await page.getByRole("img", { name: /n and k of titanium dioxide, test table/ }).waitFor();
    await browser.screenshot("frame-14-materials-uploaded");
  });

  it("an invitation goes out through the outbox and is accepted from its link", async () => {
    const { page } = browser;
    await signInAs(page, product.url, DEMO.admin);
    await page.getByRole("link", { name: "People" }).click();
    await page.getByLabel("E-mail").fill("new.reviewer@halvorsen.example");
    await page.getByRole("checkbox", { name: /Designer/ }).uncheck();
    await page.getByRole("checkbox", { name: /Reviewer/ }).check();
    await page.getByRole("button", { name: "Send invitation" }).click();
    await page.getByText(/Invitation sent to/).waitFor();
    await page.getByRole("list").getByText("new.reviewer@halvorsen.example").first().waitFor();

    await page.getByRole("link", { name: "Outbox" }).click();
    await page.getByText("Demo and development only").waitFor();
    await page.getByTestId("outbox-text").waitFor();
    await browser.screenshot("frame-15-outbox");
    // The admin reads the invitation without its link: only the invitee gets that (from their own inbox).
    expect(await page.getByTestId("outbox-text").innerText()).toContain(
      "[single-use link hidden: only its addressee can see it]",
    );
    expect(
      await page
        .getByTestId("outbox-text")
        .getByRole("link", { name: /accept-invitation/ })
        .count(),
    ).toBe(0);
    const href = mailedLink(product, "new.reviewer@halvorsen.example", "/accept-invitation").toString();
    expect(href).toMatch(/\/accept-invitation\?token=/);

    await browser.context.clearCookies();
    await page.goto(
      new URL(href!).pathname + new URL(href!).search === ""
        ? href!
        : `${product.url}${new URL(href!).pathname}${new URL(href!).search}`,
    );
    await page.getByRole("heading", { level: 1, name: /Join Halvorsen Thinfilm Works/ }).waitFor();
    await browser.screenshot("frame-16-accept-invitation");
    await page.getByLabel("Your name").fill("Oda Lindqvist");
    await page.getByLabel("Password", { exact: true }).fill("oda-lindqvist-passphrase-tern");
    await page.getByLabel("Repeat the password").fill("oda-lindqvist-passphrase-tern");
    await page.getByRole("button", { name: "Join and sign in" }).click();
    await page.waitForURL((u) => u.pathname === "/");
    expect(await page.getByTestId("signed-in-as").innerText()).toContain("Oda Lindqvist");
    await page.getByRole("heading", { name: "Waiting for your review" }).waitFor();
  });

  it("a forgotten password is reset from the mailed link", async () => {
    const { page } = browser;
    await page.goto(`${product.url}/sign-in`);
    await page.getByRole("link", { name: "Forgot your password?" }).click();
    await page.getByLabel("E-mail").fill(DEMO.reviewer);
    const [answer] = await Promise.all([
      page.waitForResponse((r) => r.url().endsWith("/api/v1/auth/password-reset")),
      page.getByRole("button", { name: "Send reset link" }).click(),
    ]);
    expect(answer.status()).toBe(202);
    await page.getByText("Check your inbox").waitFor();
    await browser.screenshot("frame-18-forgot-password-sent");

    // The admin sees the captured reset mail but not its link; the reviewer opens it from their own inbox.
    await signInAs(page, product.url, DEMO.admin);
    await page.goto(`${product.url}/outbox`);
    await page.getByRole("button", { name: /reset/i }).first().click();
    await page
      .getByTestId("outbox-text")
      .getByText(/single-use link hidden/)
      .waitFor();
    expect(
      await page
        .getByTestId("outbox-text")
        .getByRole("link", { name: /reset-password/ })
        .count(),
    ).toBe(0);
    const href = mailedLink(product, DEMO.reviewer, "/reset-password");
    await browser.context.clearCookies();

    await page.goto(`${product.url}${href.pathname}${href.search}`);
    await page.getByLabel("New password", { exact: true }).fill("short");
    await page.getByRole("button", { name: "Set password" }).click();
    await page.getByText("Use at least 12 characters.").waitFor();
    await page.getByLabel("New password", { exact: true }).fill("password1234");
    await page.getByLabel("Repeat the new password").fill("password1234");
    await page.getByRole("button", { name: "Set password" }).click();
    await page.getByText(/too easy to guess/).waitFor();
    await page.getByLabel("New password", { exact: true }).fill("reviewer-new-passphrase");
    await page.getByLabel("Repeat the new password").fill("reviewer-new-passphrase");
    await page.getByRole("button", { name: "Set password" }).click();
    await page.getByText("Password changed").waitFor();
    await browser.screenshot("frame-19-password-changed");

    await signInAs(page, product.url, DEMO.reviewer, "reviewer-new-passphrase");
    expect(await page.getByTestId("signed-in-as").innerText()).toContain("Tobiah Renwick");
  });

  it("the overview fits a tablet (820 px) without sideways scrolling", async () => {
    const tablet = await browser.context.newPage();
    await tablet.setViewportSize({ width: 820, height: 1180 });
    await signInAs(tablet, product.url, DEMO.approver);
    await tablet.getByRole("table").waitFor();
    const overflow = await tablet.evaluate(
      () => document.documentElement.scrollWidth - document.documentElement.clientWidth,
    );
    expect(overflow).toBeLessThanOrEqual(0);
    // The designs table itself fits too (its wrapper would scroll sideways otherwise).
    const tableOverflow = await tablet
      .getByRole("table")
      .evaluate((t) => (t.parentElement ? t.parentElement.scrollWidth - t.parentElement.clientWidth : 0));
    expect(tableOverflow).toBeLessThanOrEqual(0);
    await browser.screenshot("frame-17-tablet-overview", tablet);
    await tablet.close();
  });

  it("ran without console errors (besides the refused upload's 422 and the refused guessable password's 400)", () => {
    // Chromium logs every 4xx response as a console error (without its URL); the refused CSV upload answers 422 and
    // the guessable new password 400 on purpose, and `refused` shows those are the only ones.
    const deliberate = (r: string) => /^(401|422) /.test(r) || r === "400 POST /api/v1/auth/password-reset/confirm";
    expect({ errors: browser.consoleErrors.filter((e) => !/status of (400|422)/.test(e)), refused }).toEqual({
      errors: [],
      refused: refused.filter(deliberate),
    });
  });
});
