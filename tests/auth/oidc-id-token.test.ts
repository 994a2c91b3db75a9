// The ID token checks of single sign-on against a small provider of our own (discovery and
// signing keys on a local port, tokens signed here with node:crypto): the nonce must be the one
// this sign-in sent (derived from its state), a missing `email_verified` is not a confirmation,
// a token without a subject is refused, and the authorization request carries the nonce.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import http from "node:http";
import { generateKeyPairSync, sign, type KeyObject } from "node:crypto";
import { freePort } from "../../scripts/ports";

let server: http.Server;
let privateKey: KeyObject;
let issuer = "";
const saved = { ...process.env };

beforeAll(async () => {
  const pair = generateKeyPairSync("rsa", { modulusLength: 2048 });
  privateKey = pair.privateKey;
  const jwk = { ...pair.publicKey.export({ format: "jwk" }), kid: "k1", alg: "RS256", use: "sig" };
  const port = await freePort();
  issuer = `http://127.0.0.1:${port}`;
  server = http.createServer((req, res) => {
    res.setHeader("Content-Type", "application/json");
    if (req.url === "/.well-known/openid-configuration") {
      res.end(JSON.stringify({ issuer, jwks_uri: `${issuer}/jwks`, authorization_endpoint: `${issuer}/authorize`, token_endpoint: `${issuer}/token`, code_challenge_methods_supported: ["S256"] }));
    } else if (req.url === "/jwks") res.end(JSON.stringify({ keys: [jwk] }));
    else res.writeHead(404).end("{}");
  });
  await new Promise<void>((r) => server.listen(port, "127.0.0.1", () => r()));
  Object.assign(process.env, { OIDC_ISSUER: issuer, OIDC_CLIENT_ID: "saddlebook-test", OIDC_CLIENT_SECRET: "s", APP_URL: "http://127.0.0.1:3000" });
});
afterAll(async () => {
  process.env = saved;
  await new Promise((r) => server?.close(r));
});

function idToken(claims: Record<string, unknown>): string {
  const part = (o: unknown) => Buffer.from(JSON.stringify(o)).toString("base64url");
  const head = part({ alg: "RS256", kid: "k1", typ: "JWT" });
  const body = part({ iss: issuer, aud: "saddlebook-test", exp: Math.floor(Date.now() / 1000) + 300, iat: Math.floor(Date.now() / 1000), sub: "person-1", email: "someone@example.test", ...claims });
  return `${head}.${body}.${sign("RSA-SHA256", Buffer.from(`${head}.${body}`), privateKey).toString("base64url")}`;
}

describe("ID token checks", () => {
  it("accepts a token with this sign-in's nonce and refuses another sign-in's, or none", async () => {
    const { oidcConfig, oidcNonce, verifyIdToken } = await import("../../app/auth/oidc.server");
    const cfg = oidcConfig()!;
    const nonce = oidcNonce("state-of-this-browser");
    expect(nonce).toMatch(/^[A-Za-z0-9_-]{43}$/);
    expect(oidcNonce("state-of-another-browser")).not.toBe(nonce);
    await expect(verifyIdToken(cfg, idToken({ nonce, email_verified: true }), { nonce })).resolves.toMatchObject({ sub: "person-1", emailVerified: true });
    await expect(verifyIdToken(cfg, idToken({ nonce: oidcNonce("state-of-another-browser") }), { nonce })).rejects.toThrow(/nonce does not match/);
    await expect(verifyIdToken(cfg, idToken({}), { nonce })).rejects.toThrow(/nonce does not match/);
    await expect(verifyIdToken(cfg, idToken({ nonce: 12345 }), { nonce })).rejects.toThrow(/nonce does not match/);
  });

  it("counts an e-mail address as confirmed only when the token says email_verified true", async () => {
    const { oidcConfig, verifyIdToken } = await import("../../app/auth/oidc.server");
    const cfg = oidcConfig()!;
    const verified = async (claims: Record<string, unknown>) => (await verifyIdToken(cfg, idToken(claims))).emailVerified;
    expect(await verified({})).toBe(false);
    expect(await verified({ email_verified: null })).toBe(false);
    expect(await verified({ email_verified: "yes" })).toBe(false);
    expect(await verified({ email_verified: 1 })).toBe(false);
    expect(await verified({ email_verified: false })).toBe(false);
    expect(await verified({ email_verified: true })).toBe(true);
    expect(await verified({ email_verified: "true" })).toBe(true);
  });

  it("refuses a token that names nobody (no or empty subject)", async () => {
    const { oidcConfig, verifyIdToken } = await import("../../app/auth/oidc.server");
    const cfg = oidcConfig()!;
    for (const sub of [undefined, "", "   ", 42]) await expect(verifyIdToken(cfg, idToken({ sub }))).rejects.toThrow(/did not name the person/);
  });

  it("sends the nonce derived from the state with the authorization request", async () => {
    const { getAuthenticator } = await import("../../app/auth/authenticator.server");
    const { oidcNonce } = await import("../../app/auth/oidc.server");
    const auth = await getAuthenticator();
    const thrown = await auth.authenticate("oidc", new Request("http://127.0.0.1:3000/auth/oidc")).catch((e) => e);
    expect(thrown).toBeInstanceOf(Response);
    const to = new URL((thrown as Response).headers.get("Location")!);
    expect(to.origin + to.pathname).toBe(`${issuer}/authorize`);
    const state = to.searchParams.get("state")!;
    expect(state.length).toBeGreaterThan(10);
    expect(to.searchParams.get("nonce")).toBe(oidcNonce(state));
  });
});
