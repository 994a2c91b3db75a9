// Sign-in under parallel load on the real MariaDB: the attempt limit holds when guesses
// arrive all at once, password hashing never runs more than HASHING.concurrent at a time,
// and a crowd beyond the queue is told "busy" (503 with Retry-After), never 500.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { TestDatabase } from "../support/db";
import { args, authDatabase, closeAuthDatabase, cookieFrom, formRequest, getRequest, outcome } from "./support";
import { DEMO_PASSWORD } from "../../db/seeds/demo-identities";
import { LIMITS, signInLockName } from "../../app/auth/rate-limit.server";
import { HASHING, hashingLoad, withHashingTurn } from "../../app/auth/password.server";
import { SignInError, signInWithPassword, type SignedIn } from "../../app/auth/authenticator.server";
import { createUser } from "../../db/access/users.server";
import { getDb } from "../../db/client.server";

let t: TestDatabase;

beforeAll(async () => {
  t = await authDatabase();
});
afterAll(async () => {
  await closeAuthDatabase(t);
});

function form(email: string, password: string): FormData {
  const f = new FormData();
  f.set("email", email);
  f.set("password", password);
  return f;
}

/** What one sign-in came to: a SignInError's code, "success", or the unexpected error itself. */
async function verdict(run: Promise<SignedIn>): Promise<string> {
  try {
    await run;
    return "success";
  } catch (e) {
    if (e instanceof SignInError) return e.code;
    return `unexpected: ${e instanceof Error ? `${e.name}: ${e.message}` : String(e)}`;
  }
}

function tally(verdicts: string[]): Record<string, number> {
  const n: Record<string, number> = {};
  for (const v of verdicts) n[v] = (n[v] ?? 0) + 1;
  return n;
}

/** Holds every hashing turn and fills the queue, so the next caller is refused; returns the release. */
function fillHashingGate(): () => Promise<void> {
  let open!: () => void;
  const gate = new Promise<void>((resolve) => (open = resolve));
  const held = Array.from({ length: HASHING.concurrent + HASHING.queued }, () => withHashingTurn(() => gate));
  return async () => {
    open();
    await Promise.all(held);
  };
}

describe("the attempt limit under parallel guesses", () => {
  it(`evaluates exactly ${LIMITS.perAccount} of 40 simultaneous wrong guesses, and then refuses even the right password`, async () => {
    const db = getDb();
    const email = "author2@saddlebook.test";
    // Each guess from its own address: only the account limit can stop them.
    const verdicts = await Promise.all(Array.from({ length: 40 }, (_, i) => verdict(signInWithPassword(db, form(email, `wrong-guess-${i}`), `203.0.113.${i + 1}`))));
    expect(tally(verdicts)).toEqual({ invalid: LIMITS.perAccount, limited: 40 - LIMITS.perAccount });
    expect(await verdict(signInWithPassword(db, form(email, DEMO_PASSWORD), "203.0.113.200"))).toBe("limited");
    const rows = await t.db("sign_in_attempts").where({ email });
    expect(rows).toHaveLength(LIMITS.perAccount);
    expect(rows.every((r) => !r.success)).toBe(true);
  });

  it("does not count a right password for an unconfirmed account, and records a success as one", async () => {
    const db = getDb();
    const hash = (await t.db("users").where({ email: "viewer@saddlebook.test" }).first()).password_hash;
    await createUser(t.db, { email: "unconfirmed@saddlebook.test", name: "Ula Fenn", role: "viewer", passwordHash: hash });
    expect(await verdict(signInWithPassword(db, form("unconfirmed@saddlebook.test", DEMO_PASSWORD), "192.0.2.61"))).toBe("unverified");
    expect(await t.db("sign_in_attempts").where({ email: "unconfirmed@saddlebook.test" })).toHaveLength(0);
    expect(await verdict(signInWithPassword(db, form("viewer@saddlebook.test", DEMO_PASSWORD), "192.0.2.61"))).toBe("success");
    const rows = await t.db("sign_in_attempts").where({ email: "viewer@saddlebook.test" });
    expect(rows.map((r) => Boolean(r.success))).toEqual([true]);
  });

  it("names its database locks within MariaDB's 64 characters", () => {
    const db = getDb();
    const a = signInLockName(db, "account", "a-very-long-address-".repeat(12) + "@example.test");
    const b = signInLockName(db, "address", "2001:db8:ffff:ffff:ffff:ffff:ffff:ffff");
    expect(a.length).toBeLessThanOrEqual(64);
    expect(b.length).toBeLessThanOrEqual(64);
    expect(a).not.toBe(signInLockName(db, "address", "a-very-long-address-".repeat(12) + "@example.test"));
  });
});

describe("a crowd of sign-ins", () => {
  it("answers 150 simultaneous sign-ins each with success, invalid, limited or busy, hashing at most the bound at once", async () => {
    const db = getDb();
    const hash = (await t.db("users").where({ email: "viewer@saddlebook.test" }).first()).password_hash;
    for (let k = 0; k < 10; k++) {
      await createUser(t.db, { email: `crowd${k}@saddlebook.test`, name: `Crowd ${k}`, role: "viewer", passwordHash: hash, verified: true });
    }
    hashingLoad.peak = 0;
    // crowd0-4 only ever with the right password, crowd5-9 with wrong ones, and unknown addresses.
    const attempts = Array.from({ length: 150 }, (_, i) => {
      const k = i % 15;
      const email = k < 10 ? `crowd${k}@saddlebook.test` : `stranger${i}@example.test`;
      const password = k < 5 ? DEMO_PASSWORD : `wrong-${i}`;
      return { email, right: k < 5, run: verdict(signInWithPassword(db, form(email, password), `198.51.100.${i % 50}`)) };
    });
    const verdicts = await Promise.all(attempts.map((a) => a.run));
    const counts = tally(verdicts);
    expect(Object.keys(counts).filter((v) => !["success", "invalid", "limited", "busy"].includes(v))).toEqual([]);
    expect(hashingLoad.peak).toBeGreaterThan(0);
    expect(hashingLoad.peak).toBeLessThanOrEqual(HASHING.concurrent);
    // Beyond the queue the crowd is told to come back, and nothing was held against them.
    expect(counts.busy).toBeGreaterThanOrEqual(150 - HASHING.concurrent - HASHING.queued);
    // Every right password that got a turn signed in; every wrong one was refused.
    attempts.forEach((a, i) => {
      if (verdicts[i] === "busy") return;
      expect(verdicts[i]).toEqual(a.right ? "success" : a.email.startsWith("crowd") ? expect.stringMatching(/^(invalid|limited)$/) : "invalid");
    });
    expect(counts.success).toBeGreaterThan(0);
    // The limit still holds per account in the crowd.
    for (let k = 5; k < 10; k++) {
      const failures = await t.db("sign_in_attempts").where({ email: `crowd${k}@saddlebook.test`, success: false });
      expect(failures.length).toBeLessThanOrEqual(LIMITS.perAccount);
    }
  });
});

describe("the pages", () => {
  async function visit(): Promise<{ cookie: string; csrf: string }> {
    const root = await import("../../app/root");
    const r = await outcome(() => root.loader(args(getRequest("/sign-in"))));
    return { cookie: cookieFrom(r), csrf: r.body.csrf as string };
  }

  it("sign-in answers 503 with Retry-After when busy, and 429 with Retry-After when limited", async () => {
    const signIn = await import("../../app/routes/sign-in");
    const v = await visit();
    const send = () =>
      outcome(() =>
        signIn.action(args(formRequest("/sign-in", { csrf: v.csrf, email: "curator@saddlebook.test", password: DEMO_PASSWORD, next: "/" }, { cookie: v.cookie, ip: "192.0.2.77" }))),
      );
    const release = fillHashingGate();
    const busy = await send();
    await release();
    expect(busy.status).toBe(503);
    expect(busy.headers.get("Retry-After")).toBe(String(HASHING.retryAfterSeconds));
    expect(busy.body).toMatchObject({ code: "busy", email: "curator@saddlebook.test", error: expect.stringMatching(/busy.*try again/) });
    // Nothing was recorded against the account while it waited outside.
    expect(await t.db("sign_in_attempts").where({ email: "curator@saddlebook.test" })).toHaveLength(0);
    expect((await send()).status).toBe(302);

    await t.db("sign_in_attempts").insert(Array.from({ length: LIMITS.perAccount }, () => ({ email: "admin@saddlebook.test", ip: "192.0.2.78", success: false })));
    const limited = await outcome(() =>
      signIn.action(args(formRequest("/sign-in", { csrf: v.csrf, email: "admin@saddlebook.test", password: DEMO_PASSWORD, next: "/" }, { cookie: v.cookie, ip: "192.0.2.78" }))),
    );
    expect(limited.status).toBe(429);
    expect(Number(limited.headers.get("Retry-After"))).toBeGreaterThan(0);
    expect(Number(limited.headers.get("Retry-After"))).toBeLessThanOrEqual(LIMITS.windowMinutes * 60);
    expect(limited.body.code).toBe("limited");
  });

  it("register and reset-password answer 503 with Retry-After when busy, keeping what was typed", async () => {
    const register = await import("../../app/routes/register");
    const reset = await import("../../app/routes/reset-password");
    const v = await visit();
    const release = fillHashingGate();
    const reg = await outcome(() =>
      register.action(
        args(formRequest("/register", { csrf: v.csrf, name: "Nell Varga", email: "nell@example.test", password: "a-long-passphrase", confirm: "a-long-passphrase" }, { cookie: v.cookie })),
      ),
    );
    const res = await outcome(() =>
      reset.action(args(formRequest("/reset-password", { csrf: v.csrf, token: "x".repeat(43), password: "a-long-passphrase", confirm: "a-long-passphrase" }, { cookie: v.cookie }))),
    );
    await release();
    expect(reg.status).toBe(503);
    expect(reg.headers.get("Retry-After")).toBe(String(HASHING.retryAfterSeconds));
    expect(reg.body).toMatchObject({ input: { name: "Nell Varga", email: "nell@example.test" }, fields: { password: expect.stringMatching(/busy/) } });
    expect(await t.db("users").where({ email: "nell@example.test" })).toHaveLength(0);
    expect(res.status).toBe(503);
    expect(res.body).toMatchObject({ problem: null, fields: { password: expect.stringMatching(/busy/) } });
  });
});
