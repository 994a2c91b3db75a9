// Team features in the browser: a curator finds the review queue (with its count) in the
// navigation, an author does not; a refused review shows its error beside the row's buttons
// and keeps the note; sending a proposal back and approving it e-mail the author a link to the
// step (read from the local mail catcher); a group member opens a colleague's run of a mechanism
// shared with the group. Screenshots at each point.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { randomBytes } from "node:crypto";
import { apiRequest, appUrl, hasApp, openBrowser, signIn, type BrowserSession } from "../support/browser";
import { caughtMail, linkIn } from "../support/caught-mail";

describe.skipIf(!hasApp() || !process.env.MAIL_CATCHER_DIR)("review queue, review mail and group runs in the browser", () => {
  let author: BrowserSession;
  let curator: BrowserSession;
  const label = `Ketene dimerisation, review case ${randomBytes(3).toString("hex")} (illustrative)`;
  let stepId = 0;
  const api = apiRequest;
  const speciesId = async (b: BrowserSession, q: string) => ((await api(b, "GET", `/species?q=${encodeURIComponent(q)}`)).json.items as any[]).find((s) => s.label === q).id as number;

  beforeAll(async () => {
    author = await openBrowser();
    curator = await openBrowser();
    await signIn(author, "author2@saddlebook.test");
    await signIn(curator, "curator@saddlebook.test");
    const created = await api(author, "POST", "/steps", {
      label,
      reactants: [{ speciesId: await speciesId(author, "ketene"), coef: 2 }],
      products: [{ speciesId: await speciesId(author, "diketene"), coef: 1 }],
      reversible: false,
      barrier: { form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" },
      provenance: { source: "estimated", notes: "Invented for a test." },
    });
    expect(created.status, JSON.stringify(created.json)).toBe(201);
    stepId = created.json.id ?? created.json.stepId;
    expect((await api(author, "POST", `/steps/${stepId}/propose`, { comment: "ready" })).status).toBe(200);
  });
  afterAll(async () => {
    await author?.close();
    await curator?.close();
  });

  it("shows the review queue with its count to curators only", async () => {
    await author.page.goto(appUrl() + "/library");
    expect(await author.page.locator("header nav").getByText("Review queue").count()).toBe(0);
    await curator.page.goto(appUrl() + "/library");
    const link = curator.page.locator("header nav").getByRole("link", { name: /Review queue/ });
    await link.waitFor();
    expect(Number(await curator.page.getByTestId("review-count").innerText())).toBeGreaterThanOrEqual(1);
    await curator.screenshot("review-queue-in-navigation");
    await Promise.all([curator.page.waitForURL(/\/library\/review$/), link.click()]);
  });

  it("shows a refused review beside the row's buttons and keeps the note; sending back mails the author", async () => {
    const { page } = curator;
    const row = page.locator(`tr[data-step-id="${stepId}"]`);
    await row.waitFor();
    // "Send back" needs a note: refused, beside this row, nothing typed lost (spaces only here).
    await row.getByRole("textbox").fill("   ");
    await row.getByRole("button", { name: "Send back" }).click();
    await expect.poll(() => row.getByRole("alert").textContent()).toContain("Say what should change.");
    expect(await page.locator('[role="alert"]').count()).toBe(1);
    expect(await row.getByRole("textbox").inputValue()).toBe("   ");
    await curator.screenshot("review-row-error");
    await row.getByRole("textbox").fill("Give the solvent of the estimate.");
    await row.getByRole("button", { name: "Send back" }).click();
    await expect.poll(() => page.locator(`tr[data-step-id="${stepId}"]`).count()).toBe(0);
    const mail = await caughtMail("author2@saddlebook.test", `Changes requested: ${label}`);
    expect(mail.text).toContain("Give the solvent of the estimate.");
    const href = linkIn(mail, `/steps/${stepId}`);
    expect(href.startsWith(appUrl())).toBe(true);
    await author.page.goto(href);
    await author.page.getByRole("heading", { name: label }).waitFor();
    await author.screenshot("review-sent-back-step");
  });

  it("approving from the queue mails the author a link to the step", async () => {
    expect((await api(author, "POST", `/steps/${stepId}/propose`, { comment: "solvent added" })).status).toBe(200);
    const { page } = curator;
    await page.goto(appUrl() + "/library/review");
    const row = page.locator(`tr[data-step-id="${stepId}"]`);
    await row.getByRole("button", { name: "Approve" }).click();
    await expect.poll(() => page.locator(`tr[data-step-id="${stepId}"]`).count()).toBe(0);
    await page.getByRole("status").waitFor();
    await curator.screenshot("review-approved");
    const mail = await caughtMail("author2@saddlebook.test", `Approved for the library: ${label}`);
    expect(linkIn(mail, `/steps/${stepId}`)).toBe(`${appUrl()}/steps/${stepId}`);
  });

  it("a group member opens a colleague's run of a mechanism shared with the group", async () => {
    // author2 runs their group-shared demo mechanism (a private run); the curator, in the same group, opens it.
    const mine = (await api(author, "GET", "/mechanisms")).json.items as any[];
    const me = (await api(author, "GET", "/me")).json;
    const shared = mine.find((m) => m.owner_id === me.id && m.visibility === "group");
    expect(shared).toBeTruthy();
    const doc = (await api(author, "GET", `/mechanisms/${shared.id}/export`)).json;
    const initial = Object.fromEntries(doc.species.map((s: any) => [s.id, { value: 0.1, unit: "mol/L" }]));
    const started = await api(author, "POST", "/runs", { mechanismId: shared.id, name: "Group-visible run (test)", conditions: { temperature: { value: 298.15, unit: "K" }, initial, endTime: { value: 10, unit: "s" } } });
    expect(started.status, JSON.stringify(started.json)).toBe(202);
    const id = started.json.run.id;
    await expect.poll(async () => (await api(author, "GET", `/runs/${id}`)).json.run.status, { timeout: 30_000 }).toBe("done");
    expect((await api(curator, "GET", `/runs/${id}`)).status).toBe(200);
    await curator.page.goto(appUrl() + `/runs/${id}`);
    await curator.page.getByRole("heading", { name: /Group-visible run/ }).first().waitFor();
    expect(await curator.page.getByRole("button", { name: "Cancel run" }).count()).toBe(0);
    await curator.screenshot("group-member-run");
  });
});
