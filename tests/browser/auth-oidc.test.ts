// Single sign-on in Chromium through the local OpenID provider that `npm test` runs: the
// tester picks a demo identity on the provider's page, lands back signed in with that
// role, sees the menu that role gets, and signs out; an admin reaches the users table.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, hasApp, openBrowser, type BrowserSession } from "../support/browser";

describe.skipIf(!hasApp() || !process.env.OIDC_ISSUER)("single sign-on through the local provider", () => {
  let b: BrowserSession;
  beforeAll(async () => {
    b = await openBrowser();
  });
  afterAll(async () => {
    await b?.close();
  });

  async function ssoAs(name: string) {
    const { page } = b;
    await page.goto(appUrl() + "/sign-in");
    await page.getByRole("link", { name: /^Sign in with/ }).click();
    await page.waitForURL((u) => u.href.startsWith(process.env.OIDC_ISSUER!));
    expect(await page.getByRole("heading").first().textContent()).toBe("Local sign-in provider");
    await page.getByRole("button", { name: new RegExp(name) }).click();
    await page.waitForURL(appUrl() + "/");
  }

  it("signs the demo curator in, shows the menu, and signs out", async () => {
    const { page } = b;
    await ssoAs("Corin Aldane");
    const menu = page.locator("header summary");
    expect(await menu.textContent()).toMatch(/Corin Aldane\s*· curator/);
    await menu.click();
    expect(await page.locator("header details a").allTextContents()).not.toContain("Users (admin)");
    const me = await page.evaluate(async () => (await fetch("/api/v1/me")).json());
    expect(me).toMatchObject({ email: "curator@saddlebook.test", role: "curator" });
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in\?notice=signed-out$/);
  }, 45_000);

  it("signs the demo admin in, who sorts and filters the users table", async () => {
    const { page } = b;
    await ssoAs("Ada Renwick");
    await page.locator("header summary").click();
    await page.getByRole("link", { name: "Users (admin)" }).click();
    await page.waitForURL(appUrl() + "/admin/users");
    await page.waitForLoadState("networkidle");
    const table = page.getByRole("table", { name: "Users" });
    const emails = () => table.locator("tbody tr td:nth-child(2)").allTextContents();
    const first = await emails();
    expect(first).toEqual([...first].sort());
    expect(first).toEqual(expect.arrayContaining(["admin@saddlebook.test", "viewer@saddlebook.test"]));
    await table.getByRole("button", { name: /E-mail/ }).click();
    await expect.poll(emails, { timeout: 10_000 }).toEqual([...first].sort().reverse());
    await page.getByLabel("Filter users").fill("curator");
    await expect.poll(emails, { timeout: 10_000 }).toEqual(["curator@saddlebook.test"]);
    await b.screenshot("auth-admin-users");
    expect(b.problems).toEqual([]);
  }, 45_000);

  it("creates an account for a newcomer on first sign-in, from the ID token's e-mail and name", async () => {
    const { page } = b;
    await page.locator("header summary").click();
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);
    await ssoAs("Nell Okafor");
    const me = await page.evaluate(async () => (await fetch("/api/v1/me")).json());
    expect(me).toMatchObject({ email: "newcomer@saddlebook.test", name: "Nell Okafor", role: "viewer", groups: [] });
  }, 45_000);
});
