// Runs in the browser: sign in, start a run from a mechanism file, watch it finish, see the plot,
// the analysis and the table, download the CSV; start a second run at another temperature and
// compare the two. A → B first order: t½ = ln 2 / k with k from the Eyring equation (CODATA 2018).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { appUrl, hasApp, openBrowser, type BrowserSession, signIn } from "../support/browser";
import { firstOrder } from "../workbench/fixtures/mechanisms";

const KB = 1.380649e-23, H = 6.62607015e-34, R = KB * 6.02214076e23; // CODATA 2018 exact


async function startRun(b: BrowserSession, name: string, celsius: string) {
  await b.page.goto(appUrl() + "/runs/new");
  await b.page.fill('input[name="name"]', name);
  await b.page.fill('textarea[name="mechanism"]', JSON.stringify(firstOrder(85, "A to B, browser check"), null, 2));
  await b.page.getByLabel("Initial concentration of A").fill("0.2");
  await b.page.getByLabel("Temperature value").fill(celsius);
  await b.page.getByLabel("End time", { exact: true }).fill("50");
  await b.page.getByLabel("End time unit").selectOption("h");
  await Promise.all([b.page.waitForURL(/\/runs\/\d+$/), b.page.click('button:has-text("Run simulation")')]);
  await b.page.getByTestId("run-summary").waitFor({ timeout: 30_000 });
  return Number(new URL(b.page.url()).pathname.split("/").pop());
}

/** "86.88 s", "4.81 min", "2.5 h", "1.2 d" → s */
function seconds(text: string): number {
  const [v, u] = text.trim().split(/\s+/);
  return Number(v) * ({ s: 1, min: 60, h: 3600, d: 86400 } as Record<string, number>)[u];
}

describe.skipIf(!hasApp())("runs in the browser", () => {
  let b: BrowserSession;
  beforeAll(async () => {
    b = await openBrowser();
    await signIn(b, "author@saddlebook.test");
  });
  afterAll(async () => {
    await b?.close();
  });

  let first = 0;
  it("simulates, shows the plot, the analysis and the table, and downloads the CSV", async () => {
    first = await startRun(b, "browser 25 °C", "25");
    await expect.poll(() => b.page.getByTestId("conc-plot").getAttribute("data-ready"), { timeout: 15_000 }).toBe("1");
    expect(await b.page.locator('[data-testid="conc-plot"] canvas').count()).toBeGreaterThan(0);
    const k = ((KB * 298.15) / H) * Math.exp(-85e3 / (R * 298.15));
    const shown = (await b.page.getByTestId("t50-A").textContent())!;
    expect(seconds(shown) / (Math.LN2 / k)).toBeCloseTo(1, 3);
    expect(await b.page.getByTestId("results-table").locator("tbody tr").count()).toBe(25);
    const [download] = await Promise.all([b.page.waitForEvent("download"), b.page.getByRole("button", { name: "Download CSV" }).click()]);
    const file = readFileSync((await download.path())!, "utf8").trim().split("\n");
    // Comment lines first (title, units, key from names to ids), then names with units.
    expect(file[0]).toMatch(/^# Saddlebook run #\d+: browser 25 °C$/);
    expect(file).toContain("# A (mol/L) = A (id A, formula C2H4O)");
    const csv = file.filter((l) => !l.startsWith("#"));
    expect(csv[0]).toBe("time (s),T (K),A (mol/L),B (mol/L)");
    expect(csv.length).toBe(401);
    const last = csv[csv.length - 1].split(",").map(Number);
    expect(last[0]).toBeCloseTo(50 * 3600, 6);
    expect(last[2]).toBeLessThan(1e-12); // 50 h ≫ t½: A is gone
    // a row in the middle of the decay against [A] = [A]₀·exp(−kt)
    const mid = csv.map((l) => l.split(",").map(Number)).find((r) => r[0] > Math.LN2 / k)!;
    expect(mid[2] / (0.2 * Math.exp(-k * mid[0]))).toBeCloseTo(1, 4);
    await b.screenshot("workbench-run-results");
  });

  it("compares two runs on one plot and in one table", async () => {
    const second = await startRun(b, "browser 35 °C", "35");
    await b.page.goto(appUrl() + `/runs/compare?run=${first}&run=${second}`);
    await b.page.getByTestId("compare-table").waitFor();
    await expect.poll(() => b.page.getByTestId("conc-plot").getAttribute("data-ready"), { timeout: 15_000 }).toBe("1");
    const rowA = b.page.getByTestId("compare-table").locator("tr", { hasText: /^A/ });
    const cells = await rowA.locator("td").allTextContents();
    // t½ at 35 °C is shorter than at 25 °C (Eyring with ΔG‡ = 85 kJ/mol, ΔH‡ unknown → ΔS‡ = 0).
    expect(seconds(cells[2])).toBeLessThan(seconds(cells[1]));
    expect(b.problems).toEqual([]);
    await b.screenshot("workbench-compare");
  });
});
