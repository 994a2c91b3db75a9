// The free-energy profile of the demo's catalytic cycle in the browser: the workbench finds the
// cycle (catalyst acetylation, then acyl transfer to benzyl alcohol), labels its levels by species
// and step names, and shows the energetic span model's TOF with its unit, the TDTS and TDI by
// name and δE. Expected from the illustrative seed values (ΔG‡ 58.5 and 66 kJ/mol, ΔG°rxn +12 and
// −45 kJ/mol, 1 mol/L): δE = 12 + 66 = 78 kJ/mol from "Cat + anhydride" to the acyl-transfer TS,
// TOF ≈ (k_B T/h)e^{−δE/RT} ≈ 0.13 s⁻¹ at 298.15 K (Kozuch & Shaik, Acc. Chem. Res. 2011, 44, 101–110).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, hasApp, openBrowser, type BrowserSession, signIn } from "../support/browser";
import { parseFormatted } from "../../app/components/format";

/** What an internal key looks like: s<id> for a species, L<id> for a library step. */
const KEY = /\b[sL]\d+\b/;

describe.skipIf(!hasApp())("catalytic cycle on the workbench", () => {
  let b: BrowserSession;
  let mechanismId = 0;
  beforeAll(async () => {
    b = await openBrowser();
    await signIn(b, "author@saddlebook.test");
    const list = (await (await b.page.request.get(appUrl() + "/api/v1/mechanisms?limit=200")).json()) as { items: { id: number; name: string }[] };
    mechanismId = list.items.find((m) => m.name === "Illustrative acetylation cycle — benzyl alcohol")!.id;
  });
  afterAll(async () => {
    await b?.close();
  });

  it("shows the cycle's profile by name with TOF, TDTS, TDI and δE", async () => {
    const p = b.page;
    // version 1, the seeded one: other browser tests edit this mechanism's current version
    await p.goto(appUrl() + `/mechanisms/${mechanismId}/workbench?version=1`);
    await p.getByTestId("energy-profile").waitFor();
    const summary = p.getByTestId("cycle-summary");
    await summary.waitFor();
    const text = await summary.innerText();
    await summary.scrollIntoViewIfNeeded();
    await b.screenshot("workbench-cycle-profile");
    expect(text).toContain("catalyst Cat-7 (illustrative aminopyridine catalyst)");
    expect(await p.getByTestId("cycle-tdts").innerText()).toBe("TS Acyl transfer to benzyl alcohol (catalysed)");
    expect(await p.getByTestId("cycle-tdi").innerText()).toBe("Cat-7 (illustrative aminopyridine catalyst) + acetic anhydride");
    expect(await p.getByTestId("cycle-span").innerText()).toContain("78.0 kJ/mol");
    const tof = await p.getByTestId("cycle-tof").innerText();
    expect(tof).toMatch(/ s⁻¹$/);
    expect(parseFormatted(tof)).toBeGreaterThan(0.12);
    expect(parseFormatted(tof)).toBeLessThan(0.15);
    expect(text).toContain("Cat-7 acetyl ion pair + benzyl alcohol");
    const profile = (await p.getByTestId("energy-profile").textContent())!;
    expect(profile).toContain("TS Catalyst acetylation (ion pair formation): 58.5 kJ/mol");
    expect(profile).toContain("1 mol/L standard state");
    expect(profile.match(KEY)).toBeNull();
    expect(text.match(KEY)).toBeNull();
    expect(await p.getByTestId("profile-unknown").count()).toBe(0);

    // A pathway step without ΔG°rxn: its later levels are marked unknown, naming the step.
    await p.getByLabel("Pathway step Anhydride hydrolysis (uncatalysed)").check();
    await expect.poll(() => p.getByTestId("profile-unknown").count()).toBe(1);
    expect(await p.getByTestId("profile-unknown").innerText()).toContain("“Anhydride hydrolysis (uncatalysed)” has no ΔG°rxn");
    await b.screenshot("workbench-cycle-profile-unknown");
    expect(b.problems).toEqual([]);
  });
});
