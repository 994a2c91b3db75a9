// Measured data in the browser: a CSV with a deliberate bad row is refused with its line number
// (and the text is kept); the corrected file is stored with its column mapping; a barrier fitted
// to data generated from a known barrier (ΔG‡ = 85 kJ/mol, A → B, 25 °C, σ = 2 mmol/L noise)
// comes back within its standard error, starting from a model at 83 kJ/mol.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, hasApp, openBrowser, type BrowserSession, signIn } from "../support/browser";
import { firstOrder } from "../workbench/fixtures/mechanisms";
import { firstOrderCsv } from "../workbench/fixtures/synthetic-data";


describe.skipIf(!hasApp())("measured data and fits in the browser", () => {
  let b: BrowserSession;
  beforeAll(async () => {
    b = await openBrowser();
    await signIn(b, "author2@saddlebook.test");
  });
  afterAll(async () => {
    await b?.close();
  });

  const good = firstOrderCsv({ dGkJ: 85, T: 298.15, c0: 0.2, minutes: 10, points: 31, sigma: 0.002, seed: 12345 });

  it("refuses a CSV with a bad row, naming its line, and keeps the text", async () => {
    const lines = good.trimEnd().split("\n");
    lines[4] = lines[4].replace(/,[^,]+,/, ",0.18x,"); // line 5 of the file: a typo in column A
    const bad = lines.join("\n");
    await b.page.goto(appUrl() + "/data");
    await b.page.getByLabel("CSV text").fill(bad);
    await expect.poll(() => b.page.getByLabel("Time column").inputValue()).toBe("t / min");
    await b.page.fill('input[name="name"]', "A to B at 25 °C (synthetic)");
    await b.page.click('button:has-text("Store dataset")');
    const alert = b.page.getByTestId("dataset-errors");
    await alert.waitFor();
    expect(await alert.textContent()).toMatch(/Line 5: "0\.18x" in column "A" is not a number/);
    expect(await b.page.getByLabel("CSV text").inputValue()).toContain("0.18x");
    await b.screenshot("workbench-data-bad-row");
  });

  it("stores the corrected file and fits the barrier back within its standard error", async () => {
    // the model: the same step at 83 kJ/mol, run once
    await b.page.goto(appUrl() + "/runs/new");
    await b.page.fill('input[name="name"]', "model at 83 kJ/mol");
    await b.page.fill('textarea[name="mechanism"]', JSON.stringify(firstOrder(83, "A to B, fit model")));
    await b.page.getByLabel("Initial concentration of A").fill("0.2");
    await b.page.getByLabel("End time", { exact: true }).fill("10");
    await b.page.getByLabel("End time unit").selectOption("min");
    await Promise.all([b.page.waitForURL(/\/runs\/\d+$/), b.page.click('button:has-text("Run simulation")')]);
    await b.page.getByTestId("run-summary").waitFor({ timeout: 30_000 });
    const runId = new URL(b.page.url()).pathname.split("/").pop();

    await b.page.goto(appUrl() + "/data");
    await b.page.getByLabel("CSV text").fill(good);
    await expect.poll(() => b.page.getByLabel("Time unit").inputValue()).toBe("min");
    await b.page.fill('input[name="name"]', "A to B at 25 °C (synthetic)");
    await Promise.all([b.page.waitForURL(/\/data\/\d+$/), b.page.click('button:has-text("Store dataset")')]);
    await b.page.getByTestId("dataset-plot").waitFor();

    await b.page.getByLabel("Model run").selectOption(runId!);
    await b.page.getByLabel("Fit step A → B").check();
    await Promise.all([b.page.waitForURL(/fit=\d+/), b.page.click('button:has-text("Fit the ticked barriers")')]);
    const cell = b.page.getByTestId("fit-shift-ab");
    await cell.waitFor();
    const shift = Number(await cell.getAttribute("data-shift")); // J/mol
    const se = Number(await cell.getAttribute("data-se"));
    expect(se).toBeGreaterThan(0);
    expect(Math.abs(83e3 + shift - 85e3)).toBeLessThanOrEqual(se);
    expect(await b.page.getByTestId("fit-after-ab").textContent()).toMatch(/ΔG‡\(298\.15 K\) = 85\.0\d* kJ\/mol/);
    // the fitted k at the experiment's temperature with its units: (k_BT/h)e^(−85 kJ/mol / RT) ≈ 0.008 s⁻¹ (Eyring, CODATA 2018)
    expect(await b.page.getByTestId("fit-k-ab").textContent()).toMatch(/^k_fwd = 0\.00[789]\d* s⁻¹ at 298\.15 K$/);
    await expect.poll(() => b.page.getByTestId("residual-plot").getAttribute("data-ready"), { timeout: 15_000 }).toBe("1");
    expect(b.problems).toEqual([]);
    await b.screenshot("workbench-fit");
  });
});
