/**
 * The session cookie: signed with SESSION_SECRET, httpOnly, SameSite=Lax, Secure when
 * the app is served over https in production, 12-hour lifetime (renewed on sign-in).
 * It holds the user id, the CSRF token and the time of sign-in; nothing else. Signing out
 * records (user id, time of sign-in) as ended on the server (db/access/sessions.server.ts).
 */
import { createCookie, createCookieSessionStorage, type Cookie, type Session } from "react-router";

export interface SessionData {
  userId: number;
  csrf: string;
  signedInAt: number;
  /** "password" or "oidc": how this session was signed in. */
  method: string;
  /** The user's session epoch at sign-in (see db/migrations/0101_session_epoch.ts). */
  epoch: number;
  /** Where to return after single sign-on (set when the provider redirect starts). */
  oidcNext: string;
}

export interface SessionFlash {
  notice: string;
}

export const SESSION_MAX_AGE_S = 12 * 3600;
export const SESSION_COOKIE = "__saddlebook";

type Storage = ReturnType<typeof createCookieSessionStorage<SessionData, SessionFlash>>;
let storage: Storage | undefined;

/** SESSION_SECRET (development and test runs without one get a random secret per process). */
export function sessionSecret(): string {
  const s = process.env.SESSION_SECRET;
  if (s && s.length >= 16) return s;
  if (process.env.NODE_ENV === "production") {
    throw new Error("SESSION_SECRET is not set (at least 16 characters): sessions cannot be signed.");
  }
  // Development and test runs without a configured secret still work, per process.
  return (globalThis as { __sbDevSecret?: string }).__sbDevSecret ??= crypto.randomUUID() + crypto.randomUUID();
}

export function secureCookies(): boolean {
  return process.env.NODE_ENV === "production" && (process.env.APP_URL ?? "").startsWith("https://");
}

/**
 * A signed cookie that remembers the headers it has already verified. A page request reads the
 * session several times (the shell, the page, the CSRF token), and checking the signature costs
 * far more than a lookup. Only a byte-identical cookie value that passed the check before is
 * answered from memory (a fresh copy each time); anything else is verified as usual. At most
 * `size` values are remembered, oldest forgotten first.
 */
function escapeRegExp(s: string): string {
  return s.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
}

export function rememberVerified(base: Cookie, size = 1000): Cookie {
  const verified = new Map<string, string>(); // "name=value" → JSON of its verified value
  const own = new RegExp(`(?:^|;\\s*)(${escapeRegExp(base.name)}=[^;]*)`);
  return {
    get name() {
      return base.name;
    },
    get isSigned() {
      return base.isSigned;
    },
    get expires() {
      return base.expires;
    },
    async parse(header, options) {
      // Keyed by this cookie's own name=value pair, not the whole header (other cookies vary).
      const pair = header && !options ? own.exec(header)?.[1] : undefined;
      if (!pair) return base.parse(header, options);
      const known = verified.get(pair);
      if (known !== undefined) return JSON.parse(known);
      const value = await base.parse(pair);
      if (value && typeof value === "object") {
        if (verified.size >= size) verified.delete(verified.keys().next().value!);
        verified.set(pair, JSON.stringify(value));
      }
      return value;
    },
    serialize: (value, options) => base.serialize(value, options),
  };
}

export function sessionStorage(): Storage {
  storage ??= createCookieSessionStorage<SessionData, SessionFlash>({
    cookie: rememberVerified(
      createCookie(SESSION_COOKIE, {
        httpOnly: true,
        sameSite: "lax",
        secure: secureCookies(),
        path: "/",
        maxAge: SESSION_MAX_AGE_S,
        secrets: [sessionSecret()],
      }),
    ),
  });
  return storage;
}

export type AppSession = Session<SessionData, SessionFlash>;

export async function getSession(request: Request): Promise<AppSession> {
  return sessionStorage().getSession(request.headers.get("Cookie"));
}

export async function commitSession(session: AppSession): Promise<string> {
  return sessionStorage().commitSession(session);
}

export async function destroySession(session: AppSession): Promise<string> {
  return sessionStorage().destroySession(session);
}

/** A session is live while its sign-in is younger than the cookie lifetime. */
export function sessionUserId(session: AppSession, now = Date.now()): number | null {
  const id = session.get("userId");
  const at = session.get("signedInAt");
  if (typeof id !== "number" || typeof at !== "number") return null;
  if (now - at > SESSION_MAX_AGE_S * 1000) return null;
  return id;
}
