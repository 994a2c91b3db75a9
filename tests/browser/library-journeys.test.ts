// The library journeys in Chromium against the served app with the illustrative demo seed:
// search the library and open a step; build a mechanism from two library steps and one new
// step; fork a colleague's mechanism as another demo user and see the diff.
import { afterEach, describe, expect, it } from "vitest";
import { appUrl, buildThreeStepMechanism, hasApp, searchAndOpenKeteneTrapping, openBrowser, type BrowserSession, signIn } from "../support/browser";


// Journeys take several page loads each; on a busy machine they need more than the default 30 s.
const JOURNEY_MS = 120_000;

describe.skipIf(!hasApp())("library journeys in the browser", () => {
  let b: BrowserSession | undefined;
  afterEach(async () => {
    await b?.close();
    b = undefined;
  });

  it("searches the library as you type (typo-tolerant) and opens a step", async () => {
    b = await openBrowser();
    await signIn(b, "viewer@saddlebook.test");
    const { page } = b;
    await searchAndOpenKeteneTrapping(page);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toMatch(/Ketene trapping/);
    expect(await page.getByText(/k\(T\) over the validity range/).count()).toBe(1);
    expect(await page.getByText("Provenance").count()).toBeGreaterThan(0);
    expect(b.problems).toEqual([]);
    await b.screenshot("library-step");
  }, JOURNEY_MS);

  it("builds a mechanism from two library steps and one new local step", async () => {
    b = await openBrowser();
    await signIn(b, "author2@saddlebook.test");
    const { page } = b;
    const rows = await buildThreeStepMechanism(page, "Browser-built mechanism <b>escaped</b>", "Ketene dimerisation (my estimate)");
    expect(await rows.nth(0).textContent()).toContain("library v");
    expect(await rows.nth(2).textContent()).toContain("local");
    // The label is shown as text, not as markup.
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe("Browser-built mechanism <b>escaped</b>");
    expect(b.problems).toEqual([]);
    await b.screenshot("library-mechanism-built");
  }, JOURNEY_MS);

  it("guards the local step form: a species made on the spot, more than two reactants, balance and barrier warnings", async () => {
    b = await openBrowser();
    await signIn(b, "author2@saddlebook.test"); // not "author": the workbench tests open that user's newest mechanism
    const { page } = b;
    await page.goto(appUrl() + "/mechanisms");
    await page.getByLabel("Name", { exact: true }).fill("Guarded local step (illustrative)");
    await page.getByRole("button", { name: "Create" }).click();
    await page.waitForURL(/\/mechanisms\/\d+$/);
    // a species the registry does not have yet, created from the mechanism editor
    const label = `acetaldehyde enol ${Date.now()}`;
    await page.getByLabel("New species label").fill(label);
    await page.getByLabel("New species formula").fill("C2H4O");
    await page.getByRole("button", { name: "Create species" }).click();
    await expect.poll(() => page.getByText(`Added ${label} (C2H4O).`).count(), { timeout: 10_000 }).toBe(1);
    await expect.poll(() => page.getByRole("heading", { name: /^Species \(/ }).locator("..").innerText()).toContain(label);
    // three reactants (no cap of two), one of them the new species
    await page.getByRole("button", { name: "+ add reactant" }).click();
    await page.getByRole("button", { name: "+ add reactant" }).click();
    await page.getByLabel("Reactant 1", { exact: true }).selectOption({ label: `${label} (C2H4O)` });
    await page.getByLabel("Reactant 2", { exact: true }).selectOption({ label: "ketene (C2H2O)" });
    await page.getByLabel("Reactant 3", { exact: true }).selectOption({ label: "ketene (C2H2O)" });
    await page.getByLabel("Product 1", { exact: true }).selectOption({ label: "diketene (C4H4O2)" });
    // C2H4O + 2 C2H2O → C4H4O2 leaves C2H4O over: a warning, not a refusal
    await expect.poll(() => page.getByTestId("local-balance").innerText()).toMatch(/^Not balanced \(products − reactants\): (?=.*C −2)(?=.*H −4)(?=.*O −1).*It can still be added/);
    await page.getByLabel("Local step ΔG‡").fill("-5");
    await expect.poll(() => page.getByTestId("local-caution").innerText()).toMatch(/^ΔG‡ is negative .*above k_BT\/h/);
    await b.screenshot("mechanism-editor-guards");
    await page.getByRole("button", { name: "Add local step" }).click();
    await expect.poll(() => page.getByTestId("editor-step").count()).toBe(1);
    expect(await page.getByTestId("editor-step").innerText()).toContain(`${label} + 2 ketene → diketene`);
    expect(b.problems).toEqual([]);
  }, JOURNEY_MS);

  it("forks a colleague's mechanism and sees the differences from the parent", async () => {
    b = await openBrowser();
    await signIn(b, "curator@saddlebook.test");
    const { page } = b;
    await page.goto(appUrl() + "/mechanisms");
    await page.getByRole("link", { name: /alcohol series/ }).first().click();
    await page.waitForURL(/\/mechanisms\/\d+$/);
    await page.getByRole("button", { name: "Fork into my space" }).click();
    await page.waitForURL(/\/mechanisms\/\d+\/lineage$/);
    await page.getByTestId("diff").waitFor();
    expect(await page.getByTestId("diff").textContent()).toContain("0 step(s) added, 0 removed, 0 changed");
    const forkUrl = page.url().replace(/\/lineage$/, "");
    await page.goto(forkUrl);
    await page.getByRole("button", { name: /^Remove Background acetylation of tert-butanol/ }).click();
    await page.getByLabel("What changed").fill("Without tert-butanol");
    await page.getByRole("button", { name: /Save as version 2/ }).click();
    await page.waitForURL(/saved=2/);
    await page.goto(forkUrl + "/lineage?T=330");
    await page.getByTestId("diff").waitFor();
    expect(await page.getByText("Steps removed").count()).toBe(1);
    expect(await page.getByTestId("diff").textContent()).toContain("tert-butanol");
    expect(await page.getByTestId("diff").textContent()).toContain("330 K");
    expect(b.problems).toEqual([]);
    await b.screenshot("library-fork-diff");
  }, JOURNEY_MS);
});
