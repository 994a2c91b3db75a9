// The mechanism graph at first sight and the navigation on a narrow screen, in Chromium:
// - the demo catalytic mechanism's graph: no two node boxes overlap (their on-screen bounding
//   boxes) and the node text is at least 11 px on screen at the default zoom (the ring geometry
//   of the cycle is checked on the layout function in tests/workbench/graph-layout.test.ts);
// - at 390 px width the main navigation folds behind a menu button (aria-expanded), which opens
//   and closes by keyboard.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, hasApp, openBrowser, signIn, type BrowserSession } from "../support/browser";

type Box = { x: number; y: number; width: number; height: number };
const disjoint = (a: Box, b: Box) => a.x + a.width <= b.x + 0.5 || b.x + b.width <= a.x + 0.5 || a.y + a.height <= b.y + 0.5 || b.y + b.height <= a.y + 0.5;

describe.skipIf(!hasApp())("graph layout and narrow navigation in the browser", () => {
  let b: BrowserSession;
  beforeAll(async () => {
    b = await openBrowser();
    await signIn(b, "author@saddlebook.test");
  });
  afterAll(async () => {
    await b?.close();
  });

  it("draws the demo catalytic mechanism without overlapping nodes, text ≥ 11 px", async () => {
    const list = (await (await b.page.request.get(appUrl() + "/api/v1/mechanisms")).json()) as { items: { id: number; name: string }[] };
    const cycle = list.items.find((m) => m.name.startsWith("Illustrative acetylation cycle"))!;
    expect(cycle).toBeTruthy();
    await b.page.goto(appUrl() + `/mechanisms/${cycle.id}/workbench`);
    await b.page.getByTestId("mechanism-graph").waitFor();
    await expect.poll(() => b.page.getByTestId("step-node").count(), { timeout: 10_000 }).toBeGreaterThan(0);
    await b.page.waitForTimeout(500); // fitView settles after the nodes are measured
    const nodes = b.page.locator(".react-flow__node");
    const boxes: Array<Box & { text: string }> = [];
    for (let i = 0; i < (await nodes.count()); i++) {
      const n = nodes.nth(i);
      boxes.push({ ...(await n.boundingBox())!, text: await n.innerText() });
    }
    expect(boxes.length).toBeGreaterThan(5);
    for (let i = 0; i < boxes.length; i++)
      for (let j = i + 1; j < boxes.length; j++) expect(disjoint(boxes[i], boxes[j]), `"${boxes[i].text}" overlaps "${boxes[j].text}"`).toBe(true);
    // On-screen text size: the computed font size times the viewport's zoom.
    const sizes = await b.page.evaluate(() => {
      const vp = document.querySelector(".react-flow__viewport") as HTMLElement;
      const zoom = new DOMMatrixReadOnly(getComputedStyle(vp).transform).a;
      return Array.from(document.querySelectorAll(".react-flow__node *"))
        .filter((e) => e.childNodes.length && Array.from(e.childNodes).some((c) => c.nodeType === Node.TEXT_NODE && c.textContent!.trim()))
        .map((e) => parseFloat(getComputedStyle(e).fontSize) * zoom);
    });
    expect(sizes.length).toBeGreaterThan(0);
    expect(Math.min(...sizes)).toBeGreaterThanOrEqual(11);
    await b.screenshot("graph-catalytic-cycle");
    expect(b.problems).toEqual([]);
  });

  it("folds the navigation behind a menu button at 390 px, operable by keyboard", async () => {
    await b.page.setViewportSize({ width: 390, height: 844 });
    await b.page.goto(appUrl() + "/library");
    const button = b.page.getByRole("button", { name: "Menu" });
    await button.waitFor();
    expect(await button.getAttribute("aria-expanded")).toBe("false");
    expect(await b.page.locator("header nav").isVisible()).toBe(false);
    await b.screenshot("narrow-navigation-closed");
    await button.focus();
    await b.page.keyboard.press("Enter");
    await expect.poll(() => button.getAttribute("aria-expanded")).toBe("true");
    expect(await b.page.locator("header nav").isVisible()).toBe(true);
    await b.page.keyboard.press("Tab");
    expect(await b.page.evaluate(() => document.activeElement?.textContent)).toBe("Library");
    await b.screenshot("narrow-navigation-open");
    await b.page.keyboard.press("Escape");
    await expect.poll(() => button.getAttribute("aria-expanded")).toBe("false");
    expect(await b.page.evaluate(() => document.activeElement?.textContent?.trim())).toContain("Menu");
    // Opening again and following a link closes the menu on the new page.
    await button.click();
    await Promise.all([b.page.waitForURL(/\/mechanisms$/), b.page.locator("header nav").getByRole("link", { name: "Mechanisms" }).click()]);
    await expect.poll(() => button.getAttribute("aria-expanded")).toBe("false");
    // Wide again: the navigation is shown and the button is not.
    await b.page.setViewportSize({ width: 1280, height: 860 });
    expect(await b.page.locator("header nav").isVisible()).toBe(true);
    expect(await button.isVisible()).toBe(false);
  });
});
