// The local fakes `npm start` / `npm test` run: the mail catcher stores what the app's
// nodemailer transport sends (text, HTML, UTF-8 subject), and the OpenID provider issues
// a signed ID token for the identity chosen on its page, which the app's checks accept
// and whose tampered or misaddressed variants they refuse.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createHash, randomBytes } from "node:crypto";
import { readdirSync, readFileSync } from "node:fs";
import { startDevServices, type DevServices } from "../../scripts/dev-services";

let s: DevServices;
const saved = { ...process.env };

beforeAll(async () => {
  delete process.env.OIDC_ISSUER;
  delete process.env.SMTP_URL;
  s = await startDevServices({ appUrl: "http://127.0.0.1:3999", databaseUrl: "mysql://x@127.0.0.1/saddlebook_t_devservices", standins: true });
  Object.assign(process.env, s.env);
});
afterAll(async () => {
  await s?.stop();
  process.env = saved;
});

describe("mail catcher", () => {
  it("stores each message as JSON with decoded subject, text and HTML", async () => {
    const { sendMail } = await import("../../app/mail/transport.server");
    const { verificationMail } = await import("../../app/mail/templates.server");
    const url = "http://127.0.0.1:3999/verify-email?token=" + "A".repeat(43);
    await sendMail(verificationMail("zoë@example.test", "Zoë Ångström", url, 48));
    const files = readdirSync(s.env.MAIL_CATCHER_DIR);
    expect(files).toHaveLength(1);
    const m = JSON.parse(readFileSync(`${s.env.MAIL_CATCHER_DIR}/${files[0]}`, "utf8"));
    expect(m.subject).toBe("Confirm your e-mail address for Saddlebook");
    expect(m.to).toEqual(["zoë@example.test"]);
    expect(m.text).toContain("Hello Zoë Ångström,");
    // The link survives quoted-printable line folding intact.
    expect(m.text).toContain(url);
    expect(m.html).toContain(`href="${url}"`);
    const { listMailbox } = await import("../../app/mail/mailbox.server");
    expect(listMailbox().map((x) => x.subject)).toEqual([m.subject]);
  });
});

describe("local OpenID provider", () => {
  async function idTokenFor(loginHint: string, clientId = s.env.OIDC_CLIENT_ID): Promise<string> {
    const verifier = randomBytes(32).toString("base64url");
    const challenge = createHash("sha256").update(verifier).digest("base64url");
    const q = new URLSearchParams({
      response_type: "code",
      client_id: clientId,
      redirect_uri: "http://127.0.0.1:3999/auth/oidc/callback",
      state: "st",
      scope: "openid email profile",
      code_challenge: challenge,
      code_challenge_method: "S256",
    });
    const page = await fetch(`${s.env.OIDC_ISSUER}/authorize?${q}`);
    const html = await page.text();
    expect(html).toContain("Local sign-in provider");
    expect(html).toContain("curator@saddlebook.test");
    const r = await fetch(`${s.env.OIDC_ISSUER}/authorize?${q}&login_hint=${encodeURIComponent(loginHint)}`, { redirect: "manual" });
    const code = new URL(r.headers.get("location")!).searchParams.get("code")!;
    const tok = await fetch(`${s.env.OIDC_ISSUER}/token`, {
      method: "POST",
      headers: { "Content-Type": "application/x-www-form-urlencoded", Authorization: "Basic " + Buffer.from(`${clientId}:${s.env.OIDC_CLIENT_SECRET}`).toString("base64") },
      body: new URLSearchParams({ grant_type: "authorization_code", code, code_verifier: verifier, redirect_uri: "http://127.0.0.1:3999/auth/oidc/callback" }),
    });
    expect(tok.status).toBe(200);
    return ((await tok.json()) as { id_token: string }).id_token;
  }

  it("issues an ID token for the chosen demo identity that the app accepts", async () => {
    const { oidcConfig, verifyIdToken } = await import("../../app/auth/oidc.server");
    const cfg = oidcConfig()!;
    expect(cfg.issuer).toMatch(/^http:\/\/127\.0\.0\.1:\d+$/);
    const claims = await verifyIdToken(cfg, await idTokenFor("curator@saddlebook.test"));
    expect(claims).toMatchObject({ email: "curator@saddlebook.test", name: "Corin Aldane", emailVerified: true });
    expect(claims.sub).toMatch(/^local-[0-9a-f]{16}$/);
  });

  it("refuses a tampered token and one issued to another client", async () => {
    const { oidcConfig, verifyIdToken, IdTokenProblem } = await import("../../app/auth/oidc.server");
    const cfg = oidcConfig()!;
    const good = await idTokenFor("viewer@saddlebook.test");
    const [h, p, sig] = good.split(".");
    const payload = JSON.parse(Buffer.from(p, "base64url").toString());
    payload.email = "admin@saddlebook.test";
    const forged = `${h}.${Buffer.from(JSON.stringify(payload)).toString("base64url")}.${sig}`;
    await expect(verifyIdToken(cfg, forged)).rejects.toBeInstanceOf(IdTokenProblem);
    await expect(verifyIdToken(cfg, forged)).rejects.toThrow(/signature/);
    const other = await idTokenFor("viewer@saddlebook.test", "some-other-app");
    await expect(verifyIdToken(cfg, other)).rejects.toThrow(/another application/);
    await expect(verifyIdToken(cfg, "not.a.jwt")).rejects.toBeInstanceOf(Error);
  });
});

describe("stand-ins in the production server", () => {
  it("are on in development unless DEV_STANDINS=0, and in production only with DEV_STANDINS=1", async () => {
    const { standInsWanted } = await import("../../scripts/dev-services");
    expect([standInsWanted(true, undefined), standInsWanted(true, "1"), standInsWanted(true, "0")]).toEqual([true, true, false]);
    expect([standInsWanted(false, undefined), standInsWanted(false, ""), standInsWanted(false, "yes"), standInsWanted(false, "1")]).toEqual([false, false, false, true]);
  });

  it("without them, no sign-on stand-in starts and the app is told the mailbox is off", async () => {
    const saved = { OIDC_ISSUER: process.env.OIDC_ISSUER, SMTP_URL: process.env.SMTP_URL };
    delete process.env.OIDC_ISSUER;
    delete process.env.SMTP_URL;
    const off = await startDevServices({ appUrl: "http://127.0.0.1:3998", databaseUrl: "mysql://x@127.0.0.1/saddlebook_t_devservices_off", standins: false });
    try {
      expect(off.env.OIDC_ISSUER).toBeUndefined();
      expect(off.env.DEV_STANDINS).toBe("0");
      // Mail is still caught on disk (nothing is lost), but no page shows it.
      expect(off.env.MAIL_CATCHER_DIR).toBeTruthy();
      expect(off.notes.join("\n")).toMatch(/Single sign-on: off/);
    } finally {
      await off.stop();
      for (const [k, v] of Object.entries(saved)) if (v !== undefined) process.env[k] = v;
    }
  });
});
