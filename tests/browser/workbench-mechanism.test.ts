// The workbench of a demo mechanism in the browser: the graph has a node per step, the rate
// table follows the temperature (k rises from 25 °C to 60 °C for every step with a positive
// barrier — Eyring), a run starts from the conditions form, reports progress and finishes, and
// its results page draws the plot; a conditions preset is saved with the mechanism.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, hasApp, openBrowser, ownMechanismIds, type BrowserSession, signIn } from "../support/browser";


import { parseFormatted } from "../../app/components/format";

const kOf = (text: string) => parseFormatted(text); // "7.092×10⁻⁴ L mol⁻¹ s⁻¹" → 7.092e-4
/** What an internal key looks like: s<id> for a species, L<id> for a library step. */
const KEY = /\b[sL]\d+\b/;

describe.skipIf(!hasApp())("mechanism workbench in the browser", () => {
  let b: BrowserSession;
  let mechanismId = 0;
  beforeAll(async () => {
    b = await openBrowser();
    await signIn(b, "author@saddlebook.test");
    // a mechanism of the demo scenario that this author owns (so the layout and presets are theirs to save)
    mechanismId = (await ownMechanismIds(b))[0]!;
  });
  afterAll(async () => {
    await b?.close();
  });

  it("draws the graph and the rate table, which follows the temperature", async () => {
    await b.page.goto(appUrl() + `/mechanisms/${mechanismId}/workbench`);
    await b.page.getByTestId("mechanism-graph").waitFor();
    const rows = b.page.getByTestId("rate-table").locator("tbody tr");
    const n = await rows.count();
    expect(n).toBeGreaterThan(0);
    await expect.poll(() => b.page.getByTestId("step-node").count(), { timeout: 10_000 }).toBe(n);
    const k25 = kOf(await rows.first().locator("td").nth(1).innerText());
    await b.page.getByLabel("Workbench temperature", { exact: true }).fill("60");
    await expect.poll(async () => kOf(await rows.first().locator("td").nth(1).innerText())).toBeGreaterThan(k25);
    expect(await b.page.getByTestId("energy-profile").count()).toBe(1);
    // Steps and species by name in the rate table, the pathway choices and the profile.
    expect((await b.page.getByTestId("rate-table").innerText()).match(KEY)).toBeNull();
    expect((await b.page.locator("main").innerText()).match(KEY)).toBeNull();
    expect((await b.page.getByTestId("energy-profile").textContent())!.match(KEY)).toBeNull();
    await b.screenshot("workbench-mechanism");
  });

  it("runs from the conditions form with progress, and opens the results", async () => {
    await b.page.getByRole("button", { name: "Run", exact: true }).click();
    await expect.poll(() => b.page.getByTestId("workbench-run-status").textContent(), { timeout: 30_000 }).toBe("done");
    await Promise.all([b.page.waitForURL(/\/runs\/\d+$/), b.page.getByRole("link", { name: "Open the results" }).click()]);
    await expect.poll(() => b.page.getByTestId("conc-plot").getAttribute("data-ready"), { timeout: 15_000 }).toBe("1");
    expect(await b.page.getByText(`mechanism ${mechanismId}`).count()).toBeGreaterThan(0);
    // Species appear by name: the legend lists exactly the mechanism's species names, and no
    // screen text is an internal key (s12 for a species, L2 for a pinned library step).
    const doc = (await (await b.page.request.get(appUrl() + `/api/v1/mechanisms/${mechanismId}/export`)).json()) as { species: { id: string; label?: string }[] };
    expect(doc.species.some((s) => KEY.test(s.id))).toBe(true); // the keys exist, so their absence below means something
    const legend = await b.page.locator('[aria-label="Series"] label > span').allInnerTexts();
    expect(legend.filter(Boolean).sort()).toEqual(doc.species.map((s) => s.label ?? s.id).sort());
    const text = await b.page.locator("main").innerText();
    expect(text.match(KEY)).toBeNull();
    expect(await b.page.getByTestId("run-summary").innerText()).toContain(doc.species.find((s) => s.label)!.label!);
    await b.screenshot("workbench-run-names");
  });

  it("saves a conditions preset with the mechanism", async () => {
    await b.page.goto(appUrl() + `/mechanisms/${mechanismId}/workbench`);
    await b.page.getByLabel("Temperature value").fill("40");
    await b.page.getByLabel("Preset name").fill("40 °C screen");
    // Wait for the save itself: "network idle" can be reached before the post has started.
    await Promise.all([
      b.page.waitForResponse((r) => r.request().method() === "POST" && r.url().includes(`/mechanisms/${mechanismId}/workbench`)),
      b.page.getByRole("button", { name: "Save as preset" }).click(),
    ]);
    await b.page.reload();
    await expect.poll(() => b.page.locator("option", { hasText: "40 °C screen" }).count()).toBe(1);
    expect(b.problems).toEqual([]);
  });
});
