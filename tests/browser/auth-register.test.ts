// Registration in Chromium: create an account, find the confirmation mail (caught by the
// local SMTP catcher; read from its folder, as the mailbox page is for admins), follow the
// link, sign in; the link then reports that it was used. The admin reads the same mail in
// the mailbox page; the newcomer is refused it.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { randomBytes } from "node:crypto";
import { appUrl, hasApp, openBrowser, signIn, type BrowserSession } from "../support/browser";
import { caughtMail, linkIn } from "../support/caught-mail";

describe.skipIf(!hasApp() || !process.env.MAIL_CATCHER_DIR)("registration with e-mail confirmation", () => {
  let b: BrowserSession;
  const email = `ines.varga.${randomBytes(3).toString("hex")}@example.test`;
  beforeAll(async () => {
    b = await openBrowser();
  });
  afterAll(async () => {
    await b?.close();
  });

  it("registers, confirms through the mailbox link, and signs in", async () => {
    const { page } = b;
    await page.goto(appUrl() + "/register");
    await page.getByLabel("Name", { exact: true }).fill("Inès Varga");
    await page.getByLabel("E-mail", { exact: true }).fill(email);
    await page.getByLabel("Password", { exact: true }).fill("short");
    await page.getByLabel("Password again").fill("short");
    await page.getByRole("button", { name: "Create account" }).click();
    await expect.poll(() => page.getByText("Use at least 10 characters.").isVisible(), { timeout: 10_000 }).toBe(true);
    expect(await page.getByLabel("E-mail", { exact: true }).inputValue()).toBe(email);
    // The refusal is an HTTP 400, which Chromium reports on the console; nothing else may be.
    expect(b.problems.filter((p) => !/status of 400/.test(p))).toEqual([]);
    b.problems.length = 0;
    await page.getByLabel("Password", { exact: true }).fill("arrhenius-plot-7");
    await page.getByLabel("Password again").fill("arrhenius-plot-7");
    await page.getByRole("button", { name: "Create account" }).click();
    await page.waitForURL(/\/sign-in\?notice=registered$/);

    // Signed out, the mailbox page does not exist.
    const refused = await page.goto(appUrl() + "/dev/mailbox");
    expect(refused?.status()).toBe(404);
    b.problems.length = 0;
    const href = linkIn(await caughtMail(email, "Confirm your e-mail address for Saddlebook"), "/verify-email?token=");
    await page.goto(href);
    await expect.poll(() => page.getByRole("status").first().textContent(), { timeout: 10_000 }).toBe("Your e-mail address is confirmed.");

    await page.getByRole("link", { name: "Sign in" }).last().click();
    await page.waitForURL(/\/sign-in/);
    await page.getByLabel("E-mail", { exact: true }).fill(email);
    await page.getByLabel("Password", { exact: true }).fill("arrhenius-plot-7");
    await page.getByRole("button", { name: "Sign in", exact: true }).click();
    await page.waitForURL(appUrl() + "/");
    expect(await page.locator("header summary").textContent()).toContain("Inès Varga");

    await page.goto(href!, { waitUntil: "networkidle" });
    expect(await page.getByRole("alert").textContent()).toBe("This link has already been used. Ask for a new one if you still need it.");
    expect(b.problems).toEqual([]);
  }, 60_000);

  it("resets the forgotten password through the mailed link, which then works no more", async () => {
    const { page } = b;
    page.setDefaultTimeout(15_000);
    await page.locator("header summary").click();
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);
    await page.getByRole("link", { name: "Forgot your password?" }).click();
    await page.waitForURL(/\/forgot-password$/);
    await page.getByRole("heading", { name: "Forgot your password?" }).waitFor();
    await page.getByLabel("E-mail", { exact: true }).fill(email);
    await page.getByRole("button", { name: "Send the link" }).click();
    await expect.poll(() => page.getByRole("status").first().textContent(), { timeout: 10_000 }).toContain("the link is on its way");

    // Signed out, the mailbox page (which holds this very link) does not exist.
    expect((await page.goto(appUrl() + "/dev/mailbox"))?.status()).toBe(404);
    b.problems.length = 0;
    const href = linkIn(await caughtMail(email, "Set a new Saddlebook password"), "/reset-password?token=");
    await page.goto(href);
    await page.getByLabel("New password", { exact: true }).fill("eyring-polanyi-11");
    await page.getByLabel("New password again").fill("eyring-polanyi-11");
    await page.getByRole("button", { name: "Set password" }).click();
    await page.waitForURL(/\/sign-in\?notice=password-reset$/);
    await page.getByLabel("E-mail", { exact: true }).fill(email);
    await page.getByLabel("Password", { exact: true }).fill("eyring-polanyi-11");
    await page.getByRole("button", { name: "Sign in", exact: true }).click();
    await page.waitForURL(appUrl() + "/");

    await page.goto(href, { waitUntil: "networkidle" });
    expect(await page.getByRole("alert").textContent()).toBe("This link has already been used. Ask for a new one if you still need it.");
    expect(await page.getByLabel("New password", { exact: true }).count()).toBe(0);
    expect(b.problems).toEqual([]);
  }, 60_000);

  it("shows caught mail to the admin in the mailbox page", async () => {
    const { page } = b;
    await page.locator("header summary").click();
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);
    await signIn(b, "admin@saddlebook.test");
    await page.goto(appUrl() + `/dev/mailbox?to=${encodeURIComponent(email)}`, { waitUntil: "networkidle" });
    await expect.poll(() => page.getByRole("article", { name: "Set a new Saddlebook password" }).count(), { timeout: 10_000 }).toBe(1);
    await b.screenshot("auth-dev-mailbox-admin");
    expect(b.problems).toEqual([]);
  }, 60_000);
});
