// The activation-parameter page in the browser: a pasted k(T) table generated from ΔH‡ = 75 kJ/mol
// and ΔS‡ = −40 J/(mol K) by the Eyring equation (CODATA 2018 constants) gives those values back
// with both plots drawn; a bad line is named by its number and the text is kept.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, hasApp, openBrowser, signIn, type BrowserSession } from "../support/browser";

const KB = 1.380649e-23, H = 6.62607015e-34, R = KB * 6.02214076e23;
const k = (T: number) => ((KB * T) / H) * Math.exp(-40 / R) * Math.exp(-75e3 / (R * T));

describe.skipIf(!hasApp())("activation parameters in the browser", () => {
  let b: BrowserSession;
  beforeAll(async () => {
    b = await openBrowser();
  });
  afterAll(async () => {
    await b?.close();
  });

  it("fits Eyring and Arrhenius to a pasted table", async () => {
    await b.page.goto(appUrl() + "/analysis");
    const table = ["T/°C, k/s-1", ...[20, 30, 40, 50, 60].map((c) => `${c}, ${k(c + 273.15).toExponential(6)}`)].join("\n");
    await b.page.fill("#table", table);
    await b.page.selectOption('select[name="temperatureUnit"]', "degC");
    await b.page.click('button:has-text("Fit Eyring and Arrhenius")');
    await b.page.getByTestId("eyring-plot").waitFor();
    expect(await b.page.getByTestId("dH").textContent()).toMatch(/^75\.0\d* ± 0\.0\d* kJ\/mol$/);
    expect(Number.parseFloat((await b.page.getByTestId("dS").textContent())!)).toBeCloseTo(-40, 1);
    expect(await b.page.getByTestId("arrhenius-plot").count()).toBe(1);
    await b.screenshot("workbench-analysis");
  });

  it("starts a library step from the fitted parameters", async () => {
    await signIn(b, "author@saddlebook.test");
    await b.page.goto(appUrl() + "/analysis");
    const table = ["T/K, k/s-1", ...[290, 300, 310, 320, 330].map((T) => `${T}, ${k(T).toExponential(6)}`)].join("\n");
    await b.page.fill("#table", table);
    await b.page.selectOption('select[name="temperatureUnit"]', "K");
    await b.page.click('button:has-text("Fit Eyring and Arrhenius")');
    await b.page.getByTestId("save-as-step").waitFor();
    await Promise.all([b.page.waitForURL((u) => u.pathname === "/library/new"), b.page.getByTestId("save-as-step").click()]);
    await b.page.locator("#f-dH").waitFor();
    expect(Number(await b.page.inputValue("#f-dH"))).toBeCloseTo(75, 3);
    expect(Number(await b.page.inputValue("#f-dS"))).toBeCloseTo(-40, 2);
    expect(Number(await b.page.inputValue("#f-tmin"))).toBe(290);
    expect(Number(await b.page.inputValue("#f-tmax"))).toBe(330);
    expect(await b.page.inputValue("#f-method")).toContain("Eyring regression of 5");
  });

  it("names the line of a bad row and keeps the input", async () => {
    await b.page.goto(appUrl() + "/analysis");
    await b.page.fill("#table", "300, 1e-3\n310, 2e-3\n320, two\n330, 8e-3");
    await b.page.selectOption('select[name="temperatureUnit"]', "K");
    await b.page.click('button:has-text("Fit Eyring and Arrhenius")');
    await b.page.getByTestId("analysis-error").waitFor();
    expect(await b.page.getByTestId("analysis-error").textContent()).toMatch(/Line 3: the rate constant is not a number \("two"\)/);
    expect(await b.page.inputValue("#table")).toContain("320, two");
    expect(b.problems).toEqual([]);
  });
});
