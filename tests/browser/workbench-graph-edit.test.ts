// Editing a mechanism from its workbench graph in the browser: the author opens a demo mechanism
// they own, adds a library step through the graph's inline search (pinned at its version), then
// clicks a step node and changes its barrier in the side panel — k updates while typing (computed
// in the browser) and saving gives a new mechanism version each time.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, hasApp, openBrowser, ownMechanismIds, type BrowserSession, signIn } from "../support/browser";


describe.skipIf(!hasApp())("workbench graph editing in the browser", () => {
  let b: BrowserSession;
  let mechanismId = 0;
  beforeAll(async () => {
    b = await openBrowser();
    await signIn(b, "author@saddlebook.test");
    const mine = await ownMechanismIds(b);
    mechanismId = mine[mine.length - 1]!;
  });
  afterAll(async () => {
    await b?.close();
  });

  const versionShown = async () => Number(/version (\d+)/.exec(await b.page.locator("h1").innerText())![1]);

  it("adds a library step from the graph and edits a barrier in the side panel", async () => {
    const p = b.page;
    await p.goto(appUrl() + `/mechanisms/${mechanismId}/workbench`);
    await p.getByTestId("mechanism-graph").waitFor();
    const rows = p.getByTestId("rate-table").locator("tbody tr");
    const n = await rows.count();
    const v0 = await versionShown();

    // Add a library step through the inline search.
    await p.getByRole("button", { name: "+ Add step" }).click();
    const dialog = p.getByTestId("add-step");
    await dialog.getByLabel("Search library steps").fill("acetylation");
    const picks = dialog.getByRole("button", { name: /^Pick / });
    await expect.poll(() => picks.count(), { timeout: 10_000 }).toBeGreaterThan(0);
    let added = false;
    for (let i = 0; i < (await picks.count()) && !added; i++) {
      await picks.nth(i).click();
      await dialog.getByRole("button", { name: /^Add step \(version/ }).click();
      await expect.poll(async () => (await dialog.getByRole("status").count()) + (await dialog.getByRole("alert").count()), { timeout: 10_000 }).toBeGreaterThan(0);
      added = (await dialog.getByRole("status").count()) > 0;
    }
    expect(added).toBe(true);
    await expect.poll(versionShown, { timeout: 10_000 }).toBe(v0 + 1);
    await expect.poll(() => rows.count(), { timeout: 10_000 }).toBe(n + 1);
    await dialog.getByRole("button", { name: "Close" }).click();

    // Click a step node and change its barrier.
    await p.getByTestId("step-node").first().click();
    const panel = p.getByTestId("step-edit-panel");
    await panel.waitFor();
    const replace = panel.getByRole("button", { name: "Replace with local edit" });
    if (await replace.count()) await replace.click();
    await panel.getByLabel("Step barrier form").selectOption("dG");
    await panel.getByLabel("Step energy unit").selectOption("kJ/mol");
    await panel.getByLabel("Step barrier T in K").fill("298.15");
    await panel.getByLabel("Step ΔG‡").fill("80");
    const live = panel.getByTestId("live-k");
    await live.waitFor();
    const k80 = await live.innerText();
    await panel.getByLabel("Step ΔG‡").fill("85");
    await expect.poll(() => live.innerText()).not.toBe(k80);
    await b.screenshot("workbench-graph-edit");
    await panel.getByRole("button", { name: /^Save step \(version/ }).click();
    await expect.poll(versionShown, { timeout: 10_000 }).toBe(v0 + 2);
    // the new version's step shows ΔG‡ 85 kJ/mol at 298.15 K (the workbench's default 25 °C)
    await expect.poll(async () => (await p.getByTestId("step-node").allInnerTexts()).some((t) => /ΔG‡ 85(\.0+)? kJ\/mol/.test(t)), { timeout: 10_000 }).toBe(true);
  });
});
