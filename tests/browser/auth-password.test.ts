// E-mail and password sign-in in Chromium against the served app: a demo user signs in,
// sees the account menu, creates an API token that works as Bearer and stops working
// when revoked, and signs out.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, hasApp, openBrowser, type BrowserSession } from "../support/browser";

describe.skipIf(!hasApp())("sign-in with e-mail and password", () => {
  let b: BrowserSession;
  beforeAll(async () => {
    b = await openBrowser();
  });
  afterAll(async () => {
    await b?.close();
  }, 45_000);

  it("refuses a wrong password with a clear sentence and keeps the address", async () => {
    const { page } = b;
    await page.goto(appUrl() + "/sign-in");
    await page.getByLabel("E-mail", { exact: true }).fill("author2@saddlebook.test");
    await page.getByLabel("Password", { exact: true }).fill("not-the-password");
    await page.getByRole("button", { name: "Sign in", exact: true }).click();
    await expect.poll(() => page.getByRole("alert").textContent(), { timeout: 10_000 }).toBe("The e-mail address or the password is wrong.");
    expect(await page.getByLabel("E-mail", { exact: true }).inputValue()).toBe("author2@saddlebook.test");
    // The refusal is an HTTP 400, which Chromium reports on the console; nothing else may be.
    expect(b.problems.every((p) => /status of 400/.test(p))).toBe(true);
    b.problems.length = 0;
  }, 45_000);

  it("signs the demo author in, returning to the page asked for, with the account menu", async () => {
    const { page } = b;
    await page.goto(appUrl() + "/settings");
    await page.waitForURL(/\/sign-in\?next=%2Fsettings$/);
    await page.getByLabel("E-mail", { exact: true }).fill("author@saddlebook.test");
    await page.getByLabel("Password", { exact: true }).fill("saddlebook-demo");
    await page.getByRole("button", { name: "Sign in", exact: true }).click();
    await page.waitForURL(appUrl() + "/settings");
    await expect.poll(() => page.getByRole("heading", { name: "Settings" }).isVisible(), { timeout: 10_000 }).toBe(true);
    const menu = page.locator("header summary");
    expect(await menu.textContent()).toContain("Anouk Brandt");
    await menu.click();
    const links = await page.locator("header details a").allTextContents();
    expect(links).toEqual(expect.arrayContaining(["Settings", "API tokens", "Groups"]));
    expect(links).not.toContain("Users (admin)");
    await b.screenshot("auth-account-menu");
  }, 45_000);

  it("creates an API token shown once, which /api/v1/me accepts until it is revoked", async () => {
    const { page } = b;
    await page.goto(appUrl() + "/settings/tokens");
    await page.getByLabel("Name", { exact: true }).fill("browser test script");
    await page.getByRole("button", { name: "Create token" }).click();
    const field = page.getByLabel("New token");
    await field.waitFor();
    const token = await field.inputValue();
    expect(token).toMatch(/^sbk_/);
    const me = await fetch(appUrl() + "/api/v1/me", { headers: { Authorization: `Bearer ${token}` } });
    expect(me.status).toBe(200);
    expect(await me.json()).toMatchObject({ email: "author@saddlebook.test", role: "author" });
    await page.reload();
    expect(await page.getByLabel("New token").count()).toBe(0);
    const row = page.locator("tr", { hasText: "browser test script" });
    expect(await row.textContent()).not.toContain("never");
    await row.getByRole("button", { name: "Revoke browser test script" }).click();
    await expect.poll(() => page.getByRole("status").first().textContent(), { timeout: 10_000 }).toMatch(/revoked/);
    const after = await fetch(appUrl() + "/api/v1/me", { headers: { Authorization: `Bearer ${token}` } });
    expect(after.status).toBe(401);
    expect((await after.json()).error.code).toBe("unauthorized");
  }, 45_000);

  it("signs out from the account menu", async () => {
    const { page } = b;
    await page.goto(appUrl() + "/");
    await page.locator("header summary").click();
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in\?notice=signed-out$/);
    expect(await page.getByRole("status").first().textContent()).toBe("You are signed out.");
    expect(await page.locator("header").getByRole("link", { name: "Sign in" }).count()).toBe(1);
    await page.goto(appUrl() + "/settings");
    await page.waitForURL(/\/sign-in/);
    expect(b.problems).toEqual([]);
  }, 45_000);
});
