// Uploading a CSV that states its own units and temperature: the upload form reads the time unit
// and the concentration unit from the column headers and the temperature from a "# T = …" comment
// line (T/K = t/°C + 273.15), says so, and keeps the temperature column out of the species mapping;
// a temperature column that varies is reported instead of guessed.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, hasApp, openBrowser, type BrowserSession, signIn } from "../support/browser";

describe.skipIf(!hasApp())("dataset upload reads headers", () => {
  let b: BrowserSession;
  beforeAll(async () => {
    b = await openBrowser();
    await signIn(b, "author2@saddlebook.test");
  });
  afterAll(async () => {
    await b?.close();
  });

  it("reads units and temperature from the file and stores the dataset with them", async () => {
    const p = b.page;
    await p.goto(appUrl() + "/data");
    await p.getByLabel("CSV text").fill("# T = 40 °C\ntime (s),T (°C),benzyl alcohol (mmol/L)\n0,40.0,100\n60,40.1,80\n120,40.0,64\n");
    await expect.poll(() => p.getByLabel("Time unit").inputValue()).toBe("s");
    await expect.poll(() => p.locator('select[name="concentrationUnit"]').inputValue()).toBe("mmol/L");
    expect(await p.locator('input[name="temperature"]').inputValue()).toBe("313.15");
    expect(await p.locator('select[name="temperatureUnit"]').inputValue()).toBe("K");
    expect(await p.getByTestId("dataset-read-note").innerText()).toContain("temperature 313.15 K from the comment line 1");
    expect(await p.getByLabel("Use column T (°C)").isChecked()).toBe(false);
    await b.screenshot("dataset-headers-read");
    await p.fill('input[name="name"]', "benzyl alcohol at 40 °C (headers)");
    await Promise.all([p.waitForURL(/\/data\/\d+$/), p.click('button:has-text("Store dataset")')]);
    expect(await p.locator("main").innerText()).toContain("313.15 K");

    await p.goto(appUrl() + "/data");
    await p.getByLabel("CSV text").fill("t/s,T (K),A\n0,298.15,1\n10,310,0.9\n");
    await expect.poll(() => p.getByTestId("dataset-read-note").innerText()).toContain("varies from 298.15 K to 310.00 K");
    expect(b.problems).toEqual([]);
  });
});
