// The admin disables and re-enables an account on the users page, in Chromium against the app
// `npm test` serves: the row's button changes the state shown and stored, with a notice.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import knexFactory, { type Knex } from "knex";
import { knexConfigFromUrl } from "../../db/config";
import { appUrl, hasApp, openBrowser, signIn, type BrowserSession } from "../support/browser";

describe.skipIf(!hasApp() || !process.env.E2E_DATABASE_URL)("disabling an account on the users page", () => {
  let b: BrowserSession;
  let db: Knex;
  const email = `disable-me-${Date.now()}@example.test`;

  beforeAll(async () => {
    db = knexFactory(knexConfigFromUrl(process.env.E2E_DATABASE_URL!, { min: 0, max: 2 }));
    await db("users").insert({ email, name: "Dana Example (illustrative)", role: "viewer", email_verified_at: db.fn.now(3) });
    b = await openBrowser();
  });
  afterAll(async () => {
    await b?.close();
    await db?.("users").where({ email }).del();
    await db?.destroy();
  });

  it("disables the account with the row's button, then enables it again", async () => {
    const { page } = b;
    await signIn(b, "admin@saddlebook.test");
    await page.goto(appUrl() + "/admin/users");
    await page.getByLabel("Filter users").fill(email);
    const disabled = async () => !!(await db("users").where({ email }).first("disabled")).disabled;
    await page.getByRole("button", { name: `Disable ${email}` }).click();
    await page.getByText(`${email} is disabled`).waitFor();
    expect(await disabled()).toBe(true);
    await page.getByLabel("Filter users").fill(email);
    await page.getByRole("button", { name: `Enable ${email}` }).click();
    await page.getByText(`${email} is enabled again`).waitFor();
    expect(await disabled()).toBe(false);
    await b.screenshot("admin-users-disable");
    expect(b.problems).toEqual([]);
  }, 45_000);
});
