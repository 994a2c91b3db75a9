// Ensembles in the browser: from the demo acetylation cycle's workbench, open "New ensemble",
// start a small uncertainty ensemble (barrier σ from the library where stored), watch the
// progress bar and see it finish with band plots, histograms and the sensitivity table by step
// name; start a large one and cancel it. A bad entry keeps everything typed.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, hasApp, openBrowser, ownMechanismIds, signIn, type BrowserSession } from "../support/browser";

interface Doc {
  about: { name: string };
  species: { id: string; label?: string; formula?: string }[];
  steps: { id: string; label?: string }[];
}

describe.skipIf(!hasApp())("ensembles in the browser", () => {
  let b: BrowserSession;
  let mechanismId = 0;
  let doc: Doc;
  beforeAll(async () => {
    b = await openBrowser();
    await signIn(b, "author@saddlebook.test");
    for (const id of await ownMechanismIds(b)) {
      const d = (await (await b.page.request.get(appUrl() + `/api/v1/mechanisms/${id}/export`)).json()) as Doc;
      if (/acetylation cycle/.test(d.about.name)) ((mechanismId = id), (doc = d));
    }
    expect(mechanismId).toBeGreaterThan(0);
  });
  afterAll(async () => {
    await b?.close();
  });

  const name = (formula: string) => {
    const s = doc.species.find((x) => x.formula === formula)!;
    return s.label ?? s.id;
  };

  async function openForm(samples: string) {
    await b.page.goto(appUrl() + `/mechanisms/${mechanismId}/workbench`);
    await Promise.all([b.page.waitForURL(/\/ensembles\/new$/), b.page.getByTestId("new-ensemble").click()]);
    // the demo preset: acetic anhydride 1.2 mol/L, benzyl alcohol 1.0, water 0.01, catalyst 0.05
    await b.page.getByLabel(`Initial concentration of ${name("C4H6O3")}`, { exact: true }).fill("1.2");
    await b.page.getByLabel(`Initial concentration of ${name("C7H8O")}`, { exact: true }).fill("1");
    await b.page.getByLabel(`Initial concentration of ${name("H2O")}`, { exact: true }).fill("0.01");
    const cat = doc.species.find((s) => /cat/i.test(s.label ?? s.id) && !/salt|acyl|ion/i.test(s.label ?? ""));
    if (cat) await b.page.getByLabel(`Initial concentration of ${cat.label ?? cat.id}`, { exact: true }).fill("0.05");
    await b.page.getByLabel("Samples").fill(samples);
    await b.page.getByLabel("Reactant").selectOption({ label: name("C7H8O") });
  }

  it("runs a small uncertainty ensemble to the end: progress, bands, histograms, sensitivity by step name", async () => {
    await openForm("60");
    // a bad entry is refused and nothing typed is lost
    await b.page.getByLabel("Times").fill("30, soon");
    await b.page.click('button:has-text("Start ensemble")');
    await expect.poll(() => b.page.getByRole("alert").first().textContent()).toMatch(/number/);
    expect(await b.page.getByLabel("Samples").inputValue()).toBe("60");
    await b.page.getByLabel("Times").fill("1, 10");
    await Promise.all([b.page.waitForURL(/\/ensembles\/\d+$/), b.page.click('button:has-text("Start ensemble")')]);
    await b.page.getByTestId("sensitivity-table").waitFor({ timeout: 60_000 });
    expect(await b.page.getByTestId("band-plot").count()).toBeGreaterThan(0);
    expect(await b.page.locator('[data-testid="band-plot"] polyline').count()).toBeGreaterThan(0);
    expect(await b.page.getByTestId("histogram").count()).toBeGreaterThanOrEqual(2);
    const table = (await b.page.getByTestId("sensitivity-table").textContent())!;
    const stepNames = doc.steps.map((s) => s.label).filter((l): l is string => !!l);
    expect(stepNames.some((n) => table.includes(`Barrier of ${n}`))).toBe(true);
    for (const s of doc.steps) expect(table).not.toContain(`Barrier of ${s.id}`);
    expect(await b.page.getByTestId("caution-note").textContent()).toMatch(/calorimetr/);
    const csv = await (await b.page.request.get(appUrl() + b.page.url().replace(/^.*\/ensembles\//, "/api/v1/ensembles/") + "/members.csv")).text();
    expect(csv.split("\n").filter((l) => /^\d+,ok,/.test(l))).toHaveLength(60);
    expect(b.problems).toEqual([]);
    await b.screenshot("ensemble-done");
  });

  it("shows the progress bar of a large ensemble and cancels it", async () => {
    await openForm("5000");
    await Promise.all([b.page.waitForURL(/\/ensembles\/\d+$/), b.page.click('button:has-text("Start ensemble")')]);
    const bar = b.page.getByTestId("ensemble-progress");
    await bar.waitFor();
    await expect.poll(async () => Number(await bar.getAttribute("aria-valuenow")), { timeout: 20_000 }).toBeGreaterThan(0);
    await b.screenshot("ensemble-running");
    await b.page.getByRole("button", { name: "Cancel" }).click();
    await expect.poll(() => b.page.getByTestId("run-status").textContent(), { timeout: 10_000 }).toBe("cancelled");
    const done = Number(await bar.getAttribute("aria-valuenow"));
    expect(done).toBeLessThan(5000);
    expect(await b.page.getByTestId("band-plot").count()).toBe(0);
    await b.screenshot("ensemble-cancelled");
  });
});
