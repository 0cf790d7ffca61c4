// The frame of the app for each demo role: sign-in, the navigation the roles allow, the personal queue, sign-out.
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
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
  browser = await openBrowser();
});

// Each step starts signed out, whatever the step before it left behind.
beforeEach(async () => {
  await browser.context.clearCookies();
});

afterAll(async () => {
  await browser?.close();
  await product?.stop();
});

async function navLabels(): Promise<string[]> {
  const nav = browser.page.getByRole("navigation", { name: "Main" });
  await nav.waitFor();
  return (await nav.getByRole("link").allInnerTexts()).map((s) => s.trim());
}

async function signOut() {
  const { page } = browser;
  await page.getByRole("button", { name: "Sign out" }).click();
  await page.waitForURL((u) => u.pathname.startsWith("/sign-in"));
}

describe("frame: sign-in and role navigation", () => {
  it("refuses a wrong password with the server's message and keeps the person on sign-in", async () => {
    const { page } = browser;
    await page.goto(`${product.url}/sign-in`);
    await page.getByLabel("E-mail").fill(DEMO.designer);
    await page.getByLabel("Password").fill("not-the-password");
    await page.getByRole("button", { name: "Sign in" }).click();
    const alert = page.getByRole("alert");
    await alert.waitFor();
    expect(await alert.innerText()).toMatch(/do not match/i);
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    await browser.screenshot("frame-01-sign-in-refused");
  });

  it("returns to the page asked for after signing in", async () => {
    const { page } = browser;
    await page.goto(`${product.url}/materials`);
    await page.waitForURL((u) => u.pathname === "/sign-in" && u.searchParams.get("next") === "/materials");
    await page.getByLabel("E-mail").fill(DEMO.designer);
    await page.getByLabel("Password").fill(DEMO.password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL((u) => u.pathname === "/materials");
    await page.getByRole("heading", { name: "Materials", level: 1 }).waitFor();
    await signOut();
  });

  it("designer: overview, materials; queue of revisions sent back", async () => {
    const { page } = browser;
    await signInAs(page, product.url, DEMO.designer);
    // The outbox is for administrators only.
    expect(await navLabels()).toEqual(["Overview", "Materials"]);
    await page.getByTestId("demo-notice").waitFor();
    expect(await page.getByTestId("signed-in-as").innerText()).toContain("Ilse Varga");
    expect(await page.getByRole("list", { name: "Your roles" }).innerText()).toContain("Designer");
    await page.getByRole("heading", { name: "Sent back for rework" }).waitFor();
    expect(await page.getByRole("heading", { name: "Waiting for your review" }).count()).toBe(0);
    await page.getByRole("table").getByRole("link").first().waitFor();
    await browser.screenshot("frame-02-designer-home");
    await signOut();
  });

  it("reviewer: queue of reviews requested", async () => {
    const { page } = browser;
    await signInAs(page, product.url, DEMO.reviewer);
    expect(await navLabels()).toEqual(["Overview", "Materials"]);
    await page.getByRole("heading", { name: "Waiting for your review" }).waitFor();
    expect(await page.getByRole("heading", { name: "Ready for your decision" }).count()).toBe(0);
    await browser.screenshot("frame-03-reviewer-home");
    await signOut();
  });

  it("approver: audit log in the navigation; queues ready for decision and release", async () => {
    const { page } = browser;
    await signInAs(page, product.url, DEMO.approver);
    expect(await navLabels()).toEqual(["Overview", "Materials", "Audit log"]);
    await page.getByRole("heading", { name: "Ready for your decision" }).waitFor();
    await page.getByRole("heading", { name: "Signed off, ready to release" }).waitFor();
    await browser.screenshot("frame-04-approver-home");
    await page.getByRole("link", { name: "Audit log" }).click();
    await page.getByRole("heading", { name: "Audit log", level: 1 }).waitFor();
    await page.getByRole("table").waitFor();
    await browser.screenshot("frame-05-approver-audit");
    await signOut();
  });

  it("admin: people and audit log; the people page lists the demo members", async () => {
    const { page } = browser;
    await signInAs(page, product.url, DEMO.admin);
    expect(await navLabels()).toEqual(["Overview", "Materials", "People", "Audit log", "Outbox"]);
    await page.getByRole("link", { name: "People" }).click();
    await page.getByRole("heading", { name: "People", level: 1 }).waitFor();
    await page.getByText("reviewer@halvorsen.example").waitFor();
    await browser.screenshot("frame-06-admin-people");
    await signOut();
  });

  it("a designer who opens /people is told the page is not for their roles", async () => {
    const { page } = browser;
    await signInAs(page, product.url, DEMO.designer);
    await page.goto(`${product.url}/people`);
    await page.getByText(/not allowed for your roles/i).waitFor();
    await browser.screenshot("frame-07-designer-people-refused");
    await page.goto(product.url);
    await signOut();
  });

  it("ran without console errors", () => {
    expect(browser.consoleErrors).toEqual([]);
  });
});
