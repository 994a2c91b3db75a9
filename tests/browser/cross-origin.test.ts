// A page of another origin (this host, another port: the same site, so the session cookie goes
// along) tries to create a mechanism as the signed-in author, in Chromium against the app
// `npm test` serves: nothing is created.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import http from "node:http";
import knexFactory, { type Knex } from "knex";
import { knexConfigFromUrl } from "../../db/config";
import { freePort } from "../../scripts/ports";
import { appUrl, hasApp, openBrowser, signIn, type BrowserSession } from "../support/browser";

describe.skipIf(!hasApp() || !process.env.E2E_DATABASE_URL)("a page of another origin", () => {
  let b: BrowserSession;
  let db: Knex;
  let server: http.Server;
  let other = "";
  const name = `Forged from another page ${Date.now()}`;

  beforeAll(async () => {
    db = knexFactory(knexConfigFromUrl(process.env.E2E_DATABASE_URL!, { min: 0, max: 2 }));
    const body = JSON.stringify({ name, visibility: "private", steps: [] });
    const html = `<!doctype html><title>waiting</title><form id="f" method="post" action="${appUrl()}/api/v1/mechanisms" enctype="text/plain" target="out"><input name='${body.slice(0, -1)}' value='}'></form><iframe name="out"></iframe>
<script>
  fetch(${JSON.stringify(appUrl() + "/api/v1/mechanisms")}, { method: "POST", mode: "no-cors", credentials: "include", headers: { "Content-Type": "text/plain" }, body: ${JSON.stringify(body)} })
    .finally(() => { document.getElementById("f").submit(); setTimeout(() => { document.title = "sent"; }, 1500); });
</script>`;
    const port = await freePort();
    other = `http://127.0.0.1:${port}/`;
    server = http.createServer((_req, res) => res.writeHead(200, { "Content-Type": "text/html" }).end(html));
    await new Promise<void>((r) => server.listen(port, "127.0.0.1", () => r()));
    b = await openBrowser();
  });
  afterAll(async () => {
    await b?.close();
    await new Promise((r) => server?.close(r));
    await db?.destroy();
  });

  it("cannot create a mechanism as the signed-in author, by script or by form", async () => {
    const { page } = b;
    await signIn(b, "author@saddlebook.test");
    expect((await (await page.request.get(appUrl() + "/api/v1/me")).json()).email).toBe("author@saddlebook.test");
    await page.goto(other);
    await page.waitForFunction(() => document.title === "sent", undefined, { timeout: 20_000 });
    expect(await db("mechanisms").where({ name })).toHaveLength(0);
  }, 45_000);
});
