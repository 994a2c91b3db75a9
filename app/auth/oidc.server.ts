/**
 * Single sign-on through an OpenID Connect provider (authorization code + PKCE, S256):
 * remix-auth-oauth2 runs the redirect dance; this module checks the ID token and maps
 * it to a Saddlebook user.
 *
 * The ID token's signature is checked against the provider's published keys (RS256),
 * and its issuer, audience and expiry against our configuration (OpenID Connect Core
 * 1.0, section 3.1.3.7).
 */
import { createPublicKey, verify as verifySignature, type JsonWebKey } from "node:crypto";
import { OAuth2Strategy } from "remix-auth-oauth2";

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

/** Checks an ID token and returns its identity claims. */
export async function verifyIdToken(cfg: OidcConfig, idToken: string, now = Date.now()): Promise<IdClaims> {
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
  const email = typeof payload.email === "string" ? payload.email.trim().toLowerCase() : "";
  if (!email || !email.includes("@")) throw new IdTokenProblem("The sign-in provider did not share an e-mail address; Saddlebook needs one.");
  const name = typeof payload.name === "string" && payload.name.trim() ? payload.name.trim() : email.split("@")[0];
  return { sub: String(payload.sub ?? ""), email, emailVerified: payload.email_verified !== false, name };
}

/** OAuth2 strategy that forwards a `login_hint` from the sign-in link to the provider. */
export class OidcStrategy<U> extends OAuth2Strategy<U> {
  protected override authorizationParams(params: URLSearchParams, request: Request): URLSearchParams {
    const p = new URLSearchParams(params);
    const hint = new URL(request.url).searchParams.get("login_hint");
    if (hint) p.set("login_hint", hint.slice(0, 254));
    return p;
  }
}

export async function oidcEndpoints(cfg: OidcConfig): Promise<Discovery> {
  return getDiscovery(cfg);
}
