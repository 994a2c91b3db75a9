/**
 * Single sign-on through an OpenID Connect provider (authorization code + PKCE, S256):
 * remix-auth-oauth2 runs the redirect dance; this module checks the ID token and maps
 * it to a Saddlebook user.
 *
 * The ID token's signature is checked against the provider's published keys (RS256),
 * and its issuer, audience, expiry and nonce against our configuration and this sign-in
 * (OpenID Connect Core 1.0, sections 3.1.2.1 and 3.1.3.7). The nonce is derived from the
 * sign-in's `state` (kept in the browser's state cookie) with a keyed hash, so an ID token
 * issued for another browser's sign-in is refused. An e-mail address counts as confirmed
 * only when the token says `email_verified: true`.
 */
import { createHmac, createPublicKey, timingSafeEqual, verify as verifySignature, type JsonWebKey } from "node:crypto";
import { OAuth2Strategy } from "remix-auth-oauth2";
import { sessionSecret } from "./session.server";

export interface OidcConfig {
  issuer: string;
  clientId: string;
  clientSecret: string;
  redirectUri: string;
}

export function oidcConfig(): OidcConfig | null {
  const issuer = process.env.OIDC_ISSUER;
  const clientId = process.env.OIDC_CLIENT_ID;
  if (!issuer || !clientId) return null;
  const appUrl = (process.env.APP_URL ?? "http://127.0.0.1:3000").replace(/\/$/, "");
  return {
    issuer: issuer.replace(/\/$/, ""),
    clientId,
    clientSecret: process.env.OIDC_CLIENT_SECRET ?? "",
    redirectUri: `${appUrl}/auth/oidc/callback`,
  };
}

/** A display name for the provider's button ("Sign in with …"). */
export function oidcProviderName(): string {
  return process.env.OIDC_PROVIDER_NAME || "your organisation's single sign-on";
}

export interface IdClaims {
  sub: string;
  email: string;
  emailVerified: boolean;
  name: string;
}

export class IdTokenProblem extends Error {}

interface Discovery {
  issuer: string;
  jwks_uri: string;
}

let discovery: Promise<Discovery> | undefined;
let keys: { at: number; keys: Array<JsonWebKey & { kid?: string }> } | undefined;

async function getDiscovery(cfg: OidcConfig): Promise<Discovery> {
  discovery ??= fetch(`${cfg.issuer}/.well-known/openid-configuration`, { signal: AbortSignal.timeout(5000) })
    .then((r) => {
      if (!r.ok) throw new Error(`status ${r.status}`);
      return r.json() as Promise<Discovery>;
    })
    .catch((e) => {
      discovery = undefined;
      throw e;
    });
  return discovery;
}

async function signingKeys(cfg: OidcConfig, refresh: boolean) {
  if (!keys || refresh || Date.now() - keys.at > 3600_000) {
    const d = await getDiscovery(cfg);
    const r = await fetch(d.jwks_uri, { signal: AbortSignal.timeout(5000) });
    if (!r.ok) throw new IdTokenProblem("The sign-in provider's signing keys could not be fetched.");
    const body = (await r.json()) as { keys: Array<JsonWebKey & { kid?: string }> };
    keys = { at: Date.now(), keys: body.keys ?? [] };
  }
  return keys.keys;
}

function b64json(part: string): Record<string, unknown> {
  return JSON.parse(Buffer.from(part, "base64url").toString("utf8")) as Record<string, unknown>;
}

/** The nonce sent with the authorization request whose `state` is given (keyed hash, base64url). */
export function oidcNonce(state: string): string {
  return createHmac("sha256", sessionSecret()).update(`saddlebook-oidc-nonce\0${state}`).digest("base64url");
}

function sameText(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

/**
 * Checks an ID token and returns its identity claims. `expect.nonce`, when given, must be the
 * token's nonce (the sign-in flow always gives it).
 */
export async function verifyIdToken(cfg: OidcConfig, idToken: string, expect: { nonce?: string; now?: number } = {}): Promise<IdClaims> {
  const now = expect.now ?? Date.now();
  const parts = idToken.split(".");
  if (parts.length !== 3) throw new IdTokenProblem("The sign-in provider sent a malformed ID token.");
  const header = b64json(parts[0]);
  const payload = b64json(parts[1]);
  if (header.alg !== "RS256") throw new IdTokenProblem(`The ID token is signed with ${String(header.alg)}; only RS256 is accepted.`);
  const signed = Buffer.from(`${parts[0]}.${parts[1]}`);
  const signature = Buffer.from(parts[2], "base64url");
  let ok = false;
  for (const refresh of [false, true]) {
    const candidates = (await signingKeys(cfg, refresh)).filter((k) => !header.kid || k.kid === header.kid);
    ok = candidates.some((k) => {
      try {
        return verifySignature("RSA-SHA256", signed, createPublicKey({ key: k, format: "jwk" }), signature);
      } catch {
        return false;
      }
    });
    if (ok) break;
  }
  if (!ok) throw new IdTokenProblem("The ID token's signature does not match the sign-in provider's keys.");
  const d = await getDiscovery(cfg);
  const iss = String(payload.iss ?? "").replace(/\/$/, "");
  if (iss !== cfg.issuer && iss !== d.issuer.replace(/\/$/, "")) throw new IdTokenProblem("The ID token comes from another issuer.");
  const aud = Array.isArray(payload.aud) ? payload.aud : [payload.aud];
  if (!aud.includes(cfg.clientId)) throw new IdTokenProblem("The ID token was issued for another application.");
  if (typeof payload.exp !== "number" || payload.exp * 1000 < now - 60_000) throw new IdTokenProblem("The ID token has expired; sign in again.");
  if (expect.nonce !== undefined && (typeof payload.nonce !== "string" || !sameText(payload.nonce, expect.nonce))) {
    throw new IdTokenProblem("The ID token does not belong to this sign-in (its nonce does not match); start again.");
  }
  const sub = typeof payload.sub === "string" ? payload.sub.trim() : "";
  if (!sub || sub.length > 200) throw new IdTokenProblem("The sign-in provider did not name the person (no subject in the ID token).");
  const email = typeof payload.email === "string" ? payload.email.trim().toLowerCase() : "";
  if (!email || !email.includes("@")) throw new IdTokenProblem("The sign-in provider did not share an e-mail address; Saddlebook needs one.");
  const name = typeof payload.name === "string" && payload.name.trim() ? payload.name.trim() : email.split("@")[0];
  // Only an explicit true counts (some providers send the string "true"); a missing claim is not a confirmation.
  const emailVerified = payload.email_verified === true || payload.email_verified === "true";
  return { sub, email, emailVerified, name };
}

/** OAuth2 strategy that sends the nonce for this sign-in and forwards a `login_hint` from the sign-in link. */
export class OidcStrategy<U> extends OAuth2Strategy<U> {
  protected override authorizationParams(params: URLSearchParams, request: Request): URLSearchParams {
    const p = new URLSearchParams(params);
    p.set("nonce", oidcNonce(p.get("state") ?? ""));
    const hint = new URL(request.url).searchParams.get("login_hint");
    if (hint) p.set("login_hint", hint.slice(0, 254));
    return p;
  }
}

export async function oidcEndpoints(cfg: OidcConfig): Promise<Discovery> {
  return getDiscovery(cfg);
}
