// The four journeys end to end in Chromium against the served app with the illustrative demo
// seed, each as the demo role it belongs to:
//   (a) an author builds a mechanism step by step (create, two library steps, one new step, save);
//   (b) a viewer searches the shared library and opens a step;
//   (c) an author simulates a mechanism and reads the results (plot, table, analysis summary);
//   (d) a second author forks the first author's mechanism, changes it, runs parent and fork
//       and compares the two runs.
import { afterEach, describe, expect, it } from "vitest";
import { appUrl, buildThreeStepMechanism, hasApp, searchAndOpenKeteneTrapping, openBrowser, type BrowserSession, signIn } from "../support/browser";


/** Starts a run from a mechanism's workbench, waits for it, and returns the run id. */
async function runFromWorkbench(b: BrowserSession, mechanismId: number): Promise<number> {
  const { page } = b;
  await page.goto(appUrl() + `/mechanisms/${mechanismId}/workbench`);
  await page.getByTestId("rate-table").waitFor({ timeout: 60_000 });
  await page.getByRole("button", { name: "Run", exact: true }).click();
  await expect.poll(() => page.getByTestId("workbench-run-status").textContent(), { timeout: 90_000 }).toBe("done");
  await Promise.all([page.waitForURL(/\/runs\/\d+$/, { timeout: 60_000 }), page.getByRole("link", { name: "Open the results" }).click()]);
  return Number(new URL(page.url()).pathname.split("/").pop());
}

// Each journey takes several page loads and a run; the test machine has two cores.
const JOURNEY_MS = 240_000;

describe.skipIf(!hasApp())("the four journeys", () => {
  let b: BrowserSession | undefined;
  afterEach(async () => {
    await b?.close();
    b = undefined;
  });

  it("(a) an author builds a mechanism step by step and saves it", async () => {
    b = await openBrowser();
    b.page.setDefaultTimeout(60_000);
    await signIn(b, "author@saddlebook.test", { timeout: 60_000 });
    const { page } = b;
    const rows = await buildThreeStepMechanism(page, "Journey-built mechanism (illustrative)", "Ketene dimerisation (journey estimate)");
    expect(await rows.nth(0).textContent()).toContain("library v");
    expect(await rows.nth(1).textContent()).toContain("library v");
    expect(await rows.nth(2).textContent()).toContain("local");
    // Saved for real: a fresh load shows the same three steps.
    await page.reload();
    await expect.poll(() => page.getByTestId("mechanism-steps").locator("tbody tr").count()).toBe(3);
    expect(b.problems).toEqual([]);
    await b.screenshot("journey-a-build");
  }, JOURNEY_MS);

  it("(b) a viewer searches the shared library and opens a step", async () => {
    b = await openBrowser();
    b.page.setDefaultTimeout(60_000);
    await signIn(b, "viewer@saddlebook.test", { timeout: 60_000 });
    const { page } = b;
    await searchAndOpenKeteneTrapping(page);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toMatch(/Ketene trapping/);
    expect(await page.getByText(/k\(T\) over the validity range/).count()).toBe(1);
    expect(await page.getByText("Provenance").count()).toBeGreaterThan(0);
    expect(b.problems).toEqual([]);
    await b.screenshot("journey-b-search");
  }, JOURNEY_MS);

  it("(c) an author simulates a mechanism and reads the results", async () => {
    b = await openBrowser();
    b.page.setDefaultTimeout(60_000);
    await signIn(b, "author@saddlebook.test", { timeout: 60_000 });
    const { page } = b;
    const me = (await (await page.request.get(appUrl() + "/api/v1/me")).json()) as { id: number };
    const list = (await (await page.request.get(appUrl() + "/api/v1/mechanisms?mine=1")).json()) as { items: { id: number; owner_id: number }[] };
    const mechanismId = list.items.find((m) => m.owner_id === me.id)!.id;
    const runId = await runFromWorkbench(b, mechanismId);
    expect(runId).toBeGreaterThan(0);
    await expect.poll(() => page.getByTestId("conc-plot").getAttribute("data-ready"), { timeout: 60_000 }).toBe("1");
    expect(await page.locator('[data-testid="conc-plot"] canvas').count()).toBeGreaterThan(0);
    await page.getByTestId("run-summary").waitFor();
    expect((await page.getByTestId("run-summary").textContent())!.length).toBeGreaterThan(20);
    expect(await page.getByTestId("results-table").locator("tbody tr").count()).toBeGreaterThan(0);
    expect(await page.getByText(`mechanism ${mechanismId}`).count()).toBeGreaterThan(0);
    expect(b.problems).toEqual([]);
    await b.screenshot("journey-c-results");
  }, JOURNEY_MS);

  it("(d) a second author forks the first author's mechanism and compares runs of parent and fork", async () => {
    b = await openBrowser();
    b.page.setDefaultTimeout(60_000);
    await signIn(b, "author2@saddlebook.test", { timeout: 60_000 });
    const { page } = b;
    await page.goto(appUrl() + "/mechanisms");
    await page.getByRole("link", { name: /alcohol series/ }).first().click();
    await page.waitForURL(/\/mechanisms\/\d+$/);
    const parentId = Number(new URL(page.url()).pathname.split("/").pop());
    await page.getByRole("button", { name: "Fork into my space" }).click();
    await page.waitForURL(/\/mechanisms\/\d+\/lineage$/);
    const forkUrl = page.url().replace(/\/lineage$/, "");
    const forkId = Number(new URL(forkUrl).pathname.split("/").pop());
    expect(forkId).not.toBe(parentId);
    // Change the fork so the comparison has something to show.
    await page.goto(forkUrl);
    await page.getByRole("button", { name: /^Remove Background acetylation of tert-butanol/ }).click();
    await page.getByLabel("What changed").fill("Without tert-butanol");
    await page.getByRole("button", { name: /Save as version 2/ }).click();
    await page.waitForURL(/saved=2/);

    const parentRun = await runFromWorkbench(b, parentId);
    const forkRun = await runFromWorkbench(b, forkId);
    await page.goto(appUrl() + `/runs/compare?run=${parentRun}&run=${forkRun}`);
    await page.getByTestId("compare-table").waitFor();
    await expect.poll(() => page.getByTestId("conc-plot").getAttribute("data-ready"), { timeout: 60_000 }).toBe("1");
    const compared = (await page.getByTestId("compare-table").textContent())!;
    expect(compared.length).toBeGreaterThan(0);
    expect(await page.getByTestId("compare-table").locator("tr").count()).toBeGreaterThan(1);
    expect(b.problems).toEqual([]);
    await b.screenshot("journey-d-fork-compare");
  }, JOURNEY_MS);
});
