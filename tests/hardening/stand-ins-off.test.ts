/**
 * The production server as `npm start` runs it without DEV_STANDINS: an outsider asks for the
 * admin's password-reset link and tries to read it in the mailbox page, or to sign in through
 * the stand-in provider. Neither exists: the mail is caught on disk only, /dev/mailbox is 404
 * even to the admin, and the sign-in page offers no single sign-on.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { existsSync, readdirSync } from "node:fs";
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemo } from "../../db/seeds/index";
import { startAppServer, type AppServer } from "../../scripts/app-server";
import { startDevServices, type DevServices } from "../../scripts/dev-services";
import { freePort } from "../../scripts/ports";
import { DEMO_PASSWORD } from "../../db/seeds/demo-identities";

/** The csrf token and cookie a fresh visitor of `path` gets. */
async function visit(url: string, cookie = ""): Promise<{ csrf: string; cookie: string; html: string; status: number }> {
  const r = await fetch(url, { headers: cookie ? { Cookie: cookie } : {} });
  const html = await r.text();
  const csrf = html.match(/name="csrf" value="([^"]+)"/)?.[1] ?? "";
  const set = r.headers.getSetCookie().map((c) => c.split(";")[0]);
  return { csrf, cookie: [cookie, ...set].filter(Boolean).join("; "), html, status: r.status };
}

describe.skipIf(!process.env.APP_URL)("the production server without the local stand-ins", () => {
  let t: TestDatabase;
  let services: DevServices;
  let app: AppServer | undefined;
  const saved = { OIDC_ISSUER: process.env.OIDC_ISSUER, SMTP_URL: process.env.SMTP_URL };

  beforeAll(async () => {
    t = await freshDatabase();
    await seedDemo(t.db);
    delete process.env.OIDC_ISSUER;
    delete process.env.SMTP_URL;
    const port = await freePort();
    const appUrl = `http://127.0.0.1:${port}`;
    services = await startDevServices({ appUrl, databaseUrl: t.url, standins: false });
    app = await startAppServer({ port, quiet: true, env: { ...services.env, DATABASE_URL: t.url, SESSION_SECRET: "stand-ins-off-secret-stand-ins-off", APP_URL: appUrl, WEB_CONCURRENCY: "1" } });
  }, 180_000);

  afterAll(async () => {
    await app?.stop();
    await services?.stop();
    await t?.drop();
    for (const [k, v] of Object.entries(saved)) if (v !== undefined) process.env[k] = v;
  });

  it("catches the admin's reset mail on disk but shows no mailbox to anyone", async () => {
    const form = await visit(app!.url + "/forgot-password");
    const r = await fetch(app!.url + "/forgot-password", {
      method: "POST",
      headers: { "Content-Type": "application/x-www-form-urlencoded", Cookie: form.cookie, Origin: app!.url },
      body: new URLSearchParams({ csrf: form.csrf, email: "admin@saddlebook.test" }),
      redirect: "manual",
    });
    expect(r.status).toBeLessThan(500);
    const dir = services.env.MAIL_CATCHER_DIR;
    await expect.poll(() => (existsSync(dir) ? readdirSync(dir).length : 0), { timeout: 10_000 }).toBe(1);

    expect((await fetch(app!.url + "/dev/mailbox")).status).toBe(404);
    expect((await fetch(app!.url + "/dev/mailbox?to=admin%40saddlebook.test")).status).toBe(404);

    // Signed in as the admin: still no mailbox, as the stand-ins are off.
    const signIn = await visit(app!.url + "/sign-in");
    const s = await fetch(app!.url + "/sign-in", {
      method: "POST",
      headers: { "Content-Type": "application/x-www-form-urlencoded", Cookie: signIn.cookie, Origin: app!.url },
      body: new URLSearchParams({ csrf: signIn.csrf, intent: "password", email: "admin@saddlebook.test", password: DEMO_PASSWORD, next: "/" }),
      redirect: "manual",
    });
    expect(s.status).toBe(302);
    const adminCookie = [signIn.cookie, ...s.headers.getSetCookie().map((c) => c.split(";")[0])].join("; ");
    const home = await visit(app!.url + "/", adminCookie);
    expect(home.status).toBe(200);
    expect(home.html).not.toContain("/dev/mailbox");
    expect((await fetch(app!.url + "/dev/mailbox", { headers: { Cookie: adminCookie } })).status).toBe(404);
  }, 60_000);

  it("offers no single sign-on through a stand-in provider", async () => {
    const page = await visit(app!.url + "/sign-in");
    expect(page.html).not.toContain("/auth/oidc");
    expect(page.html).not.toContain("Local stand-in");
    const r = await fetch(app!.url + "/auth/oidc", { redirect: "manual" });
    expect(r.headers.get("location") ?? "").not.toMatch(/authorize/);
  });
});
