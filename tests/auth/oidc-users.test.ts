// Mapping a single sign-on identity to a Saddlebook user (real MariaDB): the first
// sign-in of a demo user links the provider's subject to the existing account; an
// unknown address creates an account (viewer) from the ID token's e-mail and name;
// an unconfirmed address is not linked to an existing account; a disabled account is
// refused; every outcome leaves its audit row.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { TestDatabase } from "../support/db";
import { authDatabase } from "./support";
import { SignInError, userFromIdClaims } from "../../app/auth/authenticator.server";

let t: TestDatabase;
beforeAll(async () => {
  t = await authDatabase();
});
afterAll(async () => {
  await t?.drop();
});

const detailOf = (row: { detail: unknown }) => (typeof row.detail === "string" ? JSON.parse(row.detail) : row.detail);

describe("single sign-on users", () => {
  it("links the subject to the demo account with the same address, then finds it by subject", async () => {
    const first = await userFromIdClaims(t.db, { sub: "sub-curator", email: "curator@saddlebook.test", emailVerified: true, name: "Corin Aldane" }, "192.0.2.5");
    const row = await t.db("users").where({ email: "curator@saddlebook.test" }).first();
    expect(first).toEqual({ userId: row.id, method: "oidc" });
    expect(row.oidc_subject).toBe("sub-curator");
    // Same subject, changed address at the provider: still the same account.
    const again = await userFromIdClaims(t.db, { sub: "sub-curator", email: "c.aldane@saddlebook.test", emailVerified: true, name: "Corin Aldane" }, "192.0.2.5");
    expect(again.userId).toBe(row.id);
  });

  it("creates a viewer account on first sign-in from the ID token's e-mail and name", async () => {
    const before = Number((await t.db("users").count({ n: "*" }).first())!.n);
    const r = await userFromIdClaims(t.db, { sub: "sub-new", email: "tamsin.oduya@example.test", emailVerified: true, name: "Tamsin Oduya" }, "192.0.2.6");
    const row = await t.db("users").where({ id: r.userId }).first();
    expect(row).toMatchObject({ email: "tamsin.oduya@example.test", name: "Tamsin Oduya", role: "viewer", oidc_subject: "sub-new", password_hash: null });
    expect(row.email_verified_at).not.toBeNull();
    expect(Number((await t.db("users").count({ n: "*" }).first())!.n)).toBe(before + 1);
    const created = await t.db("audit_log").where({ action: "user.create", user_id: r.userId }).first();
    expect(detailOf(created)).toEqual({ method: "oidc", role: "viewer" });
    const success = await t.db("audit_log").where({ action: "sign-in.success", user_id: r.userId }).first();
    expect(detailOf(success)).toEqual({ method: "oidc", created: true });
    expect(success.ip).toBe("192.0.2.6");
  });

  it("does not link an unconfirmed address to an existing account, and changes nothing", async () => {
    await expect(
      userFromIdClaims(t.db, { sub: "sub-intruder", email: "admin@saddlebook.test", emailVerified: false, name: "Not Ada" }, "192.0.2.7"),
    ).rejects.toThrow(/not confirmed this e-mail address/);
    const row = await t.db("users").where({ email: "admin@saddlebook.test" }).first();
    expect(row.oidc_subject).toBeNull();
    expect(await t.db("users").where({ oidc_subject: "sub-intruder" })).toHaveLength(0);
    const failure = await t.db("audit_log").where({ action: "sign-in.failure", user_id: row.id }).first();
    expect(detailOf(failure)).toMatchObject({ method: "oidc", reason: "unconfirmed-email" });
  });

  it("refuses a disabled account with a clear sentence and logs the failure", async () => {
    await t.db("users").where({ email: "author2@saddlebook.test" }).update({ disabled: true });
    const err = await userFromIdClaims(t.db, { sub: "sub-a2", email: "author2@saddlebook.test", emailVerified: true, name: "Teodor Quill" }, "192.0.2.8").catch((e) => e);
    expect(err).toBeInstanceOf(SignInError);
    expect(err.message).toBe("This account is disabled; ask an administrator.");
    const row = await t.db("users").where({ email: "author2@saddlebook.test" }).first();
    expect(row.oidc_subject).toBeNull();
    const failure = await t.db("audit_log").where({ action: "sign-in.failure", user_id: row.id }).first();
    expect(detailOf(failure)).toMatchObject({ method: "oidc", reason: "disabled" });
    expect(failure.ip).toBe("192.0.2.8");
  });

  it("never binds a new subject to an account already bound to another, and signs nobody in", async () => {
    // The curator's account was bound to "sub-curator" above; another identity at the provider now claims the address.
    const before = await t.db("users").where({ email: "curator@saddlebook.test" }).first();
    expect(before.oidc_subject).toBe("sub-curator");
    const err = await userFromIdClaims(t.db, { sub: "sub-impostor", email: "curator@saddlebook.test", emailVerified: true, name: "Not Corin" }, "192.0.2.9").catch((e) => e);
    expect(err).toBeInstanceOf(SignInError);
    expect(err.message).toMatch(/linked to a different single sign-on identity/);
    const after = await t.db("users").where({ email: "curator@saddlebook.test" }).first();
    expect(after.oidc_subject).toBe("sub-curator");
    expect(await t.db("users").where({ oidc_subject: "sub-impostor" })).toHaveLength(0);
    const failure = await t.db("audit_log").where({ action: "sign-in.failure", user_id: after.id }).orderBy("id", "desc").first();
    expect(detailOf(failure)).toMatchObject({ method: "oidc", reason: "other-subject" });
    // The bound identity still signs in.
    expect((await userFromIdClaims(t.db, { sub: "sub-curator", email: "curator@saddlebook.test", emailVerified: true, name: "Corin Aldane" }, "192.0.2.9")).userId).toBe(after.id);
  });

  it("refuses an identity without a subject", async () => {
    await expect(userFromIdClaims(t.db, { sub: "", email: "author@saddlebook.test", emailVerified: true, name: "Anouk Brandt" }, "192.0.2.10")).rejects.toThrow(/did not name the person/);
  });
});
