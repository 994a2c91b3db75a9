// The home page and the app shell in Debian's Chromium: fonts and styles are served by
// the app itself (no other host), the console stays clean, unknown pages get the 404.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, hasApp, openBrowser, type BrowserSession } from "../support/browser";

describe.skipIf(!hasApp())("app shell in the browser", () => {
  let b: BrowserSession;
  beforeAll(async () => {
    b = await openBrowser();
  });
  afterAll(async () => {
    await b?.close();
  });

  it("loads the home page with its stylesheet and Noto Sans from 127.0.0.1 only", async () => {
    const fontResponses: string[] = [];
    b.page.on("response", (r) => {
      if (/noto-sans.*\.woff2/.test(r.url()) && r.ok()) fontResponses.push(r.url());
    });
    await b.page.goto(appUrl() + "/", { waitUntil: "networkidle" });
    await expect.poll(() => b.page.locator("header nav").isVisible()).toBe(true);
    for (const label of ["Library", "Mechanisms", "Runs", "Data"]) {
      expect(await b.page.locator("header nav").getByText(label, { exact: true }).count()).toBeGreaterThan(0);
    }
    // The body is set in Noto Sans and the font file actually loaded.
    const family = await b.page.evaluate(() => getComputedStyle(document.body).fontFamily);
    expect(family).toContain("Noto Sans");
    const loaded = await b.page.evaluate(async () => {
      await document.fonts.ready;
      return document.fonts.check('16px "Noto Sans"');
    });
    expect(loaded).toBe(true);
    expect(fontResponses.length).toBeGreaterThan(0);
    const sheets = await b.page.evaluate(() => Array.from(document.styleSheets).map((s) => s.href ?? "inline"));
    expect(sheets.some((h) => h.includes("/assets/"))).toBe(true);
    // Nothing but the app's own host was asked for anything.
    const host = new URL(appUrl()).host;
    const foreign = b.requests.filter((u) => !u.startsWith("data:") && new URL(u).host !== host);
    expect(foreign).toEqual([]);
    expect(b.problems).toEqual([]);
    await b.screenshot("home");
  });

  it("shows its own 404 page for an unknown address", async () => {
    const response = await b.page.goto(appUrl() + "/no-such-page");
    expect(response?.status()).toBe(404);
    expect(await b.page.getByRole("heading").first().textContent()).toMatch(/not found/i);
  });
});
