// Nothing typed is lost, in Chromium: leaving the mechanism editor or the step editor with
// unsaved input asks first (stay keeps every field; leave goes on), and an earlier version of a
// mechanism is restored from its history page as a new version.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, hasApp, openBrowser, type BrowserSession, signIn } from "../support/browser";

describe.skipIf(!hasApp())("unsaved input and restoring versions in the browser", () => {
  let b: BrowserSession;
  beforeAll(async () => {
    b = await openBrowser();
    await signIn(b, "author2@saddlebook.test"); // not "author": the workbench tests open that user's newest mechanism
  });
  afterAll(async () => {
    await b?.close();
  });

  let mechanismUrl = "";
  it("asks before leaving the mechanism editor with unsaved input, and keeps it on stay", async () => {
    const { page } = b;
    await page.goto(appUrl() + "/mechanisms");
    await page.getByLabel("Name", { exact: true }).fill("Restorable mechanism (illustrative)");
    await page.getByRole("button", { name: "Create" }).click();
    await page.waitForURL(/\/mechanisms\/\d+$/);
    mechanismUrl = page.url();
    await page.getByLabel("Local step label").fill("typed but not saved");
    await page.getByRole("link", { name: "History" }).click();
    await page.getByTestId("leave-guard").waitFor();
    await b.screenshot("leave-guard-mechanism");
    await page.getByRole("button", { name: "Stay and keep editing" }).click();
    expect(page.url()).toBe(mechanismUrl);
    expect(await page.getByLabel("Local step label").inputValue()).toBe("typed but not saved");
    await page.getByRole("link", { name: "History" }).click();
    await page.getByRole("button", { name: "Leave without saving" }).click();
    await page.waitForURL(/\/history$/);
  });

  it("restores version 1 of the mechanism as version 3 from the history page", async () => {
    const { page } = b;
    await page.goto(mechanismUrl);
    await page.locator("#m-name").fill("Renamed in version 2");
    await page.getByLabel("What changed").fill("rename");
    await page.getByRole("button", { name: /Save as version 2/ }).click();
    await page.waitForURL(/saved=2/);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Renamed in version 2");
    await page.getByRole("link", { name: "History" }).click();
    await page.waitForURL(/\/history$/);
    await page.getByRole("button", { name: "Restore v1 as version 3" }).click();
    await page.waitForURL(/saved=3/);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Restorable mechanism (illustrative)");
    await page.goto(mechanismUrl + "/history");
    expect(await page.getByRole("cell", { name: "Restored version 1." }).count()).toBe(1);
    expect(b.problems).toEqual([]);
  });

  it("asks before leaving the step editor with unsaved input", async () => {
    const { page } = b;
    await page.goto(appUrl() + "/library/new");
    await page.locator("#f-label").fill("half-typed step");
    await page.getByRole("link", { name: "Runs", exact: true }).click();
    await page.getByTestId("leave-guard").waitFor();
    await page.getByRole("button", { name: "Stay and keep editing" }).click();
    expect(await page.locator("#f-label").inputValue()).toBe("half-typed step");
    expect(page.url()).toMatch(/\/library\/new$/);
    await b.screenshot("leave-guard-step");
  });
});
