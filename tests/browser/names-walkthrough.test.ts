// A walk through the points where a kineticist reads names, not keys, and where the forms guard
// the chemistry and the typing, with a screenshot at each: the rate table and step panel of the
// workbench, the unsaved-conditions warning, the run's plot legend, results table and summary,
// the comparison of two runs, the diff of a fork against its parent, the step form's balance and
// negative-ΔG‡ warnings, restoring an earlier version, and an empty mechanism's workbench. No
// visible text may be an internal key (s12 for a species, L2 for a pinned library step), and
// unit labels keep their case ("kJ/mol", never upper-cased by style).
// Earlier suites assert the behaviour of most of these points in depth (workbench-mechanism,
// workbench-runs, library-journeys, unsaved-and-restore); this one checks the names on each.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiRequest, appUrl, hasApp, openBrowser, signIn, type BrowserSession } from "../support/browser";

const KEY = /\b[sL]\d+\b/;
const WALK_MS = 120_000;

describe.skipIf(!hasApp())("names and guards, a walkthrough in the browser", () => {
  let b: BrowserSession;
  let forkId = 0;
  const api = (method: "GET" | "POST", path: string, body?: unknown) => apiRequest(b, method, path, body);
  /** Visible text of `selector` (main by default) has no internal key; a screenshot is taken. */
  async function point(name: string, selector = "main") {
    const text = await b.page.locator(selector).first().innerText();
    expect(text.match(KEY), `${name}: "${text.match(KEY)?.[0]}" in the text`).toBeNull();
    await b.screenshot(`walkthrough-${name}`);
    return text;
  }

  beforeAll(async () => {
    b = await openBrowser();
    await signIn(b, "author2@saddlebook.test");
    const list = (await api("GET", "/mechanisms")).json.items as { id: number; name: string }[];
    forkId = list.find((m) => m.name.startsWith("Cycle with faster acyl transfer"))!.id;
  });
  afterAll(async () => {
    await b?.close();
  });

  it("workbench: rate table and step panel by name; leaving with changed conditions asks first", async () => {
    const { page } = b;
    await page.goto(appUrl() + `/mechanisms/${forkId}/workbench`);
    await page.getByTestId("rate-table").waitFor();
    await expect.poll(() => page.getByTestId("step-node").count(), { timeout: 10_000 }).toBeGreaterThan(0);
    const rates = await point("rate-table", '[data-testid="rate-table"]');
    expect(rates).toContain("kJ/mol");
    expect(rates).not.toContain("KJ/MOL");
    await page.getByTestId("step-node").first().click();
    await page.locator('[data-testid="step-edit-panel"], [data-testid="step-panel"]').first().waitFor();
    await point("step-panel", '[data-testid="step-edit-panel"], [data-testid="step-panel"]');
    // Unsaved conditions: the guard asks before the page is left, and keeps them on stay.
    await page.getByLabel("Temperature value", { exact: true }).fill("40");
    await page.locator("header nav").getByRole("link", { name: "Library" }).click();
    await page.getByTestId("leave-guard").waitFor();
    await point("unsaved-conditions", "body");
    await page.getByRole("button", { name: "Stay and keep editing" }).click();
    expect(await page.getByLabel("Temperature value", { exact: true }).inputValue()).toBe("40");
  }, WALK_MS);

  it("run: plot legend, results table and summary by name; two runs compared by name", async () => {
    const { page } = b;
    await page.getByRole("button", { name: "Run", exact: true }).click();
    await expect.poll(() => page.getByTestId("workbench-run-status").textContent(), { timeout: 30_000 }).toBe("done");
    await Promise.all([page.waitForURL(/\/runs\/\d+$/), page.getByRole("link", { name: "Open the results" }).click()]);
    const first = Number(new URL(page.url()).pathname.split("/").pop());
    await expect.poll(() => page.getByTestId("conc-plot").getAttribute("data-ready"), { timeout: 15_000 }).toBe("1");
    const legend = await page.locator('[aria-label="Series"] label > span').allInnerTexts();
    expect(legend.filter(Boolean).length).toBeGreaterThan(0);
    expect(legend.join(" ").match(KEY)).toBeNull();
    await point("run-plot-legend", '[aria-label="Series"]');
    await point("results-table", '[data-testid="results-table"]');
    await point("run-summary", '[data-testid="run-summary"]');
    // A second run of the same mechanism at another temperature, then the comparison.
    const doc = (await api("GET", `/mechanisms/${forkId}/export`)).json;
    const initial = Object.fromEntries(doc.species.map((s: any, i: number) => [s.id, { value: i === 0 ? 0.1 : 0, unit: "mol/L" }]));
    const second = await api("POST", "/runs", { mechanismId: forkId, conditions: { temperature: { value: 40, unit: "°C" }, initial, endTime: { value: 2, unit: "h" } } });
    expect(second.status).toBe(202);
    await expect.poll(async () => (await api("GET", `/runs/${second.json.run.id}`)).json.run.status, { timeout: 30_000 }).toBe("done");
    await page.goto(appUrl() + `/runs/compare?run=${first}&run=${second.json.run.id}`);
    await page.getByTestId("compare-table").waitFor();
    await point("comparison");
  }, WALK_MS);

  it("fork: the diff against the parent by name", async () => {
    await b.page.goto(appUrl() + `/mechanisms/${forkId}/lineage`);
    await b.page.getByTestId("diff").waitFor();
    await point("diff");
  });

  it("step form: balance and negative-ΔG‡ warnings; an earlier version restored; an empty mechanism's workbench", async () => {
    const { page } = b;
    await page.goto(appUrl() + "/mechanisms");
    await page.getByLabel("Name", { exact: true }).fill("Walkthrough mechanism (illustrative)");
    await page.getByRole("button", { name: "Create" }).click();
    await page.waitForURL(/\/mechanisms\/\d+$/);
    const mechUrl = page.url().replace(/\?.*$/, "");
    // A new mechanism has no steps: its workbench opens on the empty state.
    await page.goto(mechUrl + "/workbench");
    await page.getByTestId("workbench-empty").waitFor();
    expect(await page.getByTestId("workbench-empty").innerText()).toMatch(/Add a step to start/);
    await point("empty-workbench");
    await page.goto(mechUrl);
    await page.getByLabel("Reactant 1", { exact: true }).selectOption({ label: "ketene (C2H2O)" });
    await page.getByLabel("Product 1", { exact: true }).selectOption({ label: "diketene (C4H4O2)" });
    await expect.poll(() => page.getByTestId("local-balance").innerText()).toMatch(/^Not balanced/);
    await page.getByLabel("Local step ΔG‡").fill("-5");
    await expect.poll(() => page.getByTestId("local-caution").innerText()).toMatch(/^ΔG‡ is negative/);
    const guards = await point("step-form-guards");
    expect(guards).toContain("kJ/mol");
    await page.getByRole("button", { name: "Add local step" }).click();
    await expect.poll(() => page.getByTestId("editor-step").count()).toBe(1);
    await page.getByLabel("What changed").fill("first step");
    await page.getByRole("button", { name: /Save as version 2/ }).click();
    await page.waitForURL(/saved=2/);
    await page.getByRole("link", { name: "History" }).click();
    await page.waitForURL(/\/history$/);
    await point("history");
    await page.getByRole("button", { name: "Restore v1 as version 3" }).click();
    await page.waitForURL(/saved=3/);
    await point("restored-version");
    expect(b.problems).toEqual([]);
  }, WALK_MS);
});
