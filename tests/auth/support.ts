/**
 * Helpers for calling auth route modules directly: a migrated database with the demo
 * identities, session cookies, form requests, and one shape for whatever a loader or
 * action returns or throws (Response, data() or a plain object).
 */
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemoIdentities } from "../../db/seeds/demo-identities";

export async function authDatabase(): Promise<TestDatabase> {
  const t = await freshDatabase();
  await seedDemoIdentities(t.db);
  // Route modules reach the database through getDb(), which reads this once per process.
  process.env.DATABASE_URL = t.url;
  // Mail goes to the in-memory outbox (app/mail/transport.server.ts) in these tests.
  delete process.env.SMTP_URL;
  return t;
}

export interface Outcome {
  status: number;
  headers: Headers;
  body: any;
}

export async function outcome(run: () => Promise<unknown>): Promise<Outcome> {
  let value: unknown;
  try {
    value = await run();
  } catch (e) {
    value = e;
  }
  if (value instanceof Response) {
    const text = await value.text();
    let body: unknown = text;
    try {
      body = JSON.parse(text);
    } catch {
      // not JSON
    }
    return { status: value.status, headers: value.headers, body };
  }
  if (value && typeof value === "object" && (value as { type?: string }).type === "DataWithResponseInit") {
    const v = value as { data: unknown; init: ResponseInit | null };
    return { status: v.init?.status ?? 200, headers: new Headers(v.init?.headers), body: v.data };
  }
  if (value instanceof Error) throw value;
  return { status: 200, headers: new Headers(), body: value };
}

/** Cookie header value from a Set-Cookie header (first cookie pair). */
export function cookieFrom(res: { headers: Headers }): string {
  const set = res.headers.get("Set-Cookie") ?? "";
  return set.split(";")[0];
}

export function formRequest(path: string, fields: Record<string, string>, opts: { cookie?: string; ip?: string } = {}): Request {
  const headers: Record<string, string> = { "Content-Type": "application/x-www-form-urlencoded" };
  if (opts.cookie) headers.Cookie = opts.cookie;
  if (opts.ip) headers["X-Forwarded-For"] = opts.ip;
  return new Request(`http://127.0.0.1:3000${path}`, { method: "POST", headers, body: new URLSearchParams(fields).toString() });
}

export function getRequest(path: string, opts: { cookie?: string; ip?: string; headers?: Record<string, string> } = {}): Request {
  const headers: Record<string, string> = { ...(opts.headers ?? {}) };
  if (opts.cookie) headers.Cookie = opts.cookie;
  if (opts.ip) headers["X-Forwarded-For"] = opts.ip;
  return new Request(`http://127.0.0.1:3000${path}`, { headers });
}

export function args(request: Request, params: Record<string, string> = {}): any {
  return { request, params, context: {} };
}

/** A session cookie for a demo identity, signed in through the sign-in page as a browser would. */
export async function demoSessionCookie(email: string, ip = "192.0.2.99"): Promise<string> {
  const root = await import("../../app/root");
  const signIn = await import("../../app/routes/sign-in");
  const { DEMO_PASSWORD } = await import("../../db/seeds/demo-identities");
  const v = await outcome(() => root.loader(args(getRequest("/sign-in"))));
  const r = await outcome(() => signIn.action(args(formRequest("/sign-in", { csrf: v.body.csrf, email, password: DEMO_PASSWORD, next: "/" }, { cookie: cookieFrom(v), ip }))));
  if (r.status !== 302) throw new Error(`Signing in ${email} answered ${r.status}: ${JSON.stringify(r.body).slice(0, 200)}`);
  return cookieFrom(r);
}

/** Closes the app's database connection and drops the test database. */
export async function closeAuthDatabase(t: TestDatabase | undefined): Promise<void> {
  const { getDb } = await import("../../db/client.server");
  await getDb().destroy();
  await t?.drop();
}
