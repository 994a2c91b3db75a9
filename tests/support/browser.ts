/**
 * Browser tests drive Debian's Chromium through playwright-core against the app that
 * `npm test` serves (APP_URL). Screenshots go to test-results/ (not committed).
 */
import { expect } from "vitest";
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { mkdirSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { DEMO_PASSWORD } from "../../db/seeds/demo-identities";

export const appUrl = (): string => {
  const url = process.env.APP_URL;
  if (!url) throw new Error("APP_URL is not set: browser tests run through `npm test`, which serves the app.");
  return url;
};

/** True when the served app is available (npm test); browser suites skip otherwise. */
export const hasApp = (): boolean => !!process.env.APP_URL;

/**
 * Signs a demo identity in through the e-mail and password form (password of every
 * demo identity: DEMO_PASSWORD) and waits until the app has left the sign-in page.
 */
export async function signIn(b: BrowserSession, email: string, opts: { timeout?: number } = {}): Promise<void> {
  await b.page.goto(appUrl() + "/sign-in");
  await b.page.fill('input[name="email"]', email);
  await b.page.fill('input[name="password"]', DEMO_PASSWORD);
  await Promise.all([
    b.page.waitForURL((u) => !u.pathname.startsWith("/sign-in"), opts.timeout ? { timeout: opts.timeout } : undefined),
    b.page.click('button[name="intent"][value="password"]'),
  ]);
}

/** Ids of the mechanisms the signed-in user of `b` owns, in the API's list order. */
export async function ownMechanismIds(b: BrowserSession): Promise<number[]> {
  const me = (await (await b.page.request.get(appUrl() + "/api/v1/me")).json()) as { id: number };
  const list = (await (await b.page.request.get(appUrl() + "/api/v1/mechanisms")).json()) as { items: { id: number; owner_id: number }[] };
  return list.items.filter((m) => m.owner_id === me.id).map((m) => m.id);
}

/** An API request with the signed-in session of `b` (same-origin, JSON), and its status and JSON body. */
export async function apiRequest(b: BrowserSession, method: "GET" | "POST", path: string, body?: unknown): Promise<{ status: number; json: any }> {
  const res = await b.page.request.fetch(appUrl() + "/api/v1" + path, {
    method,
    headers: { Origin: new URL(appUrl()).origin, "Content-Type": "application/json" },
    ...(body === undefined ? {} : { data: JSON.stringify(body) }),
  });
  return { status: res.status(), json: await res.json() };
}

export interface BrowserSession {
  context: BrowserContext;
  page: Page;
  /** Console errors and failed requests seen so far. */
  problems: string[];
  /** Every request URL the page made. */
  requests: string[];
  close(): Promise<void>;
  screenshot(name: string): Promise<void>;
}

export async function openBrowser(): Promise<BrowserSession> {
  const dir = mkdtempSync(join(tmpdir(), "saddlebook-browser-"));
  const context = await chromium.launchPersistentContext(dir, {
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    viewport: { width: 1280, height: 860 },
    args: [
      "--headless",
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
    ],
  });
  const page = context.pages()[0] ?? (await context.newPage());
  const problems: string[] = [];
  const requests: string[] = [];
  page.on("console", (m) => {
    if (m.type() === "error") problems.push(`console: ${m.text()}`);
  });
  page.on("pageerror", (e) => problems.push(`page error: ${e.message}`));
  page.on("requestfailed", (r) => {
    // Navigations away cancel pending requests; those are not failures of the app.
    if (r.failure()?.errorText !== "net::ERR_ABORTED") problems.push(`request failed: ${r.url()} ${r.failure()?.errorText}`);
  });
  page.on("request", (r) => requests.push(r.url()));
  const shots = resolve(import.meta.dirname, "../../test-results/screenshots");
  return {
    context,
    page,
    problems,
    requests,
    async close() {
      await context.close();
      rmSync(dir, { recursive: true, force: true });
    },
    async screenshot(name: string) {
      mkdirSync(shots, { recursive: true });
      await page.screenshot({ path: join(shots, `${name}.png`), fullPage: true });
    },
  };
}

/**
 * Builds the demo scenario's three-step mechanism in the mechanism editor: creates `name`,
 * pins two library steps (background acetylation of ethanol, uncatalysed anhydride hydrolysis),
 * adds a local ketene dimerisation labelled `localLabel` (ΔG‡ 18 kcal/mol) and saves version 2.
 * Returns the saved page's step rows (three, once they are shown).
 */
export async function buildThreeStepMechanism(page: Page, name: string, localLabel: string) {
  await page.goto(appUrl() + "/mechanisms");
  await page.getByLabel("Name", { exact: true }).fill(name);
  await page.getByRole("button", { name: "Create" }).click();
  await page.waitForURL(/\/mechanisms\/\d+$/);
  const search = page.getByLabel("Search the library");
  await search.fill("Background acetylation of ethanol");
  await page.getByRole("button", { name: "Add Background acetylation of ethanol" }).click();
  await search.fill("Anhydride hydrolysis uncatalysed");
  await page.getByRole("button", { name: "Add Anhydride hydrolysis (uncatalysed)" }).click();
  await expect.poll(() => page.getByTestId("editor-step").count()).toBe(2);
  await page.getByLabel("Local step label").fill(localLabel);
  await page.getByLabel("Reactant 1", { exact: true }).selectOption({ label: "ketene (C2H2O)" });
  await page.getByLabel("Reactant 1 coefficient", { exact: true }).fill("2");
  await page.getByLabel("Product 1", { exact: true }).selectOption({ label: "diketene (C4H4O2)" });
  // 2 C2H2O → C4H4O2: the balance from the formulas is shown before the step is added
  await expect.poll(() => page.getByTestId("local-balance").innerText()).toBe("Elements and charge balance.");
  await page.getByLabel("Local step ΔG‡").fill("18");
  await page.getByLabel("Local step energy unit").selectOption("kcal/mol");
  await page.getByRole("button", { name: "Add local step" }).click();
  await expect.poll(() => page.getByTestId("editor-step").count()).toBe(3);
  // the form starts afresh for the next step
  expect(await page.getByLabel("Local step label").inputValue()).toBe("");
  expect(await page.getByLabel("Reactant 1", { exact: true }).inputValue()).toBe("");
  await page.getByLabel("What changed").fill("Two library steps and a local dimerisation");
  await page.getByRole("button", { name: /Save as version 2/ }).click();
  await page.waitForURL(/saved=2/);
  const rows = page.getByTestId("mechanism-steps").locator("tbody tr");
  await expect.poll(() => rows.count()).toBe(3);
  return rows;
}

/** Searches the library with a typo ("ketene traping") and opens the first "Ketene trapping" hit. */
export async function searchAndOpenKeteneTrapping(page: Page): Promise<void> {
  await page.goto(appUrl() + "/library");
  await page.getByLabel(/Search species/).fill("ketene traping");
  await page.waitForURL(/q=ketene\+traping/);
  const first = page.locator("tbody a", { hasText: "Ketene trapping" }).first();
  await first.waitFor();
  await first.click();
  await page.waitForURL(/\/steps\/\d+$/);
}
