/**
 * remix-auth: the "password" strategy (remix-auth-form + bcrypt) and the "oidc"
 * strategy (remix-auth-oauth2 against OIDC_ISSUER). Both resolve to the signed-in user's
 * id; routes then start the session (app/auth/sign-in.server.ts).
 */
import { Authenticator } from "remix-auth";
import { FormStrategy } from "remix-auth-form";
import { z } from "zod";
import type { Knex } from "knex";
import { getDb } from "../../db/client.server";
import { audit } from "../../db/access/audit.server";
import {
  createUser,
  findUserByEmail,
  findUserByOidcSubject,
  linkOidcSubject,
  markEmailVerified,
  type Role,
} from "../../db/access/users.server";
import { clientAddress } from "./client-address.server";
import { PasswordHashingBusy, withHashingTurn, BUSY_MESSAGE, HASHING } from "./password.server";
import { claimSignInAttempt, recordSignInAttempt, settleSignInAttempt, SignInLockTimeout } from "./rate-limit.server";
import { OidcStrategy, oidcConfig, oidcNonce, verifyIdToken, type IdClaims } from "./oidc.server";

export interface SignedIn {
  userId: number;
  method: "password" | "oidc";
}

/** A refusal to show on the sign-in page (never a stack trace). */
export class SignInError extends Error {
  constructor(
    message: string,
    readonly code:
      | "invalid"
      | "unverified"
      | "limited"
      | "busy"
      | "disabled"
      | "unavailable"
      | "unconfirmed-email"
      | "no-subject"
      | "other-subject" = "invalid",
    readonly email?: string,
    /** For "limited" and "busy": when to come back, in seconds. */
    readonly retryAfterSeconds?: number,
  ) {
    super(message);
  }
}

export const WRONG_CREDENTIALS = "The e-mail address or the password is wrong.";

/** The global role of people who arrive without an invitation. */
export function defaultRole(): Role {
  const r = process.env.DEFAULT_ROLE;
  return r === "author" || r === "viewer" ? r : "viewer";
}

const credentialsSchema = z.object({
  email: z.string().trim().toLowerCase().email("Enter your e-mail address.").max(254),
  password: z.string().min(1, "Enter your password.").max(200),
});

/**
 * Checks e-mail and password (with rate limits, attempt log and audit rows). The whole check
 * holds one hashing turn (app/auth/password.server.ts), so sign-ins in this process never
 * hold more database connections than there are turns; when the queue for turns is full the
 * answer is "busy" and nothing is recorded against the account.
 */
export async function signInWithPassword(db: Knex, form: FormData, ip: string): Promise<SignedIn> {
  const parsed = credentialsSchema.safeParse({ email: form.get("email") ?? "", password: form.get("password") ?? "" });
  if (!parsed.success) throw new SignInError(parsed.error.issues[0]?.message ?? WRONG_CREDENTIALS);
  const { email, password } = parsed.data;
  try {
    return await withHashingTurn((checkPassword) => checkCredentials(db, email, password, ip, checkPassword));
  } catch (e) {
    if (e instanceof PasswordHashingBusy || e instanceof SignInLockTimeout) {
      throw new SignInError(BUSY_MESSAGE, "busy", email, HASHING.retryAfterSeconds);
    }
    throw e;
  }
}

async function checkCredentials(
  db: Knex,
  email: string,
  password: string,
  ip: string,
  checkPassword: (password: string, hash: string | null) => Promise<boolean>,
): Promise<SignedIn> {
  // Counted and written as a failure before hashing: parallel guesses cannot pass the limit.
  const claim = await claimSignInAttempt(db, email, ip);
  if (!claim.allowed) {
    await audit(db, { userId: null, action: "sign-in.refused", detail: { email, reason: "rate-limit" }, ip });
    throw new SignInError(claim.message!, "limited", email, claim.retryAfterSeconds);
  }
  const user = await findUserByEmail(db, email);
  const ok = await checkPassword(password, user?.passwordHash ?? null);
  if (!user || !ok) {
    // The claimed attempt stays a failure.
    await audit(db, {
      userId: user?.id ?? null,
      action: "sign-in.failure",
      objectType: "user",
      objectId: user?.id ?? null,
      detail: { email, method: "password", reason: user ? "wrong-password" : "unknown-user" },
      ip,
    });
    throw new SignInError(WRONG_CREDENTIALS, "invalid", email);
  }
  if (user.disabled || !user.emailVerifiedAt) {
    // The password was right: only wrong passwords count towards the limit.
    await settleSignInAttempt(db, claim.attemptId, "forget");
    const reason = user.disabled ? "disabled" : "unverified";
    await audit(db, { userId: user.id, action: "sign-in.failure", objectType: "user", objectId: user.id, detail: { method: "password", reason }, ip });
    if (user.disabled) throw new SignInError("This account is disabled; ask an administrator.", "disabled", email);
    throw new SignInError("Confirm your e-mail address first: open the link we sent you, or ask for a new one below.", "unverified", email);
  }
  await settleSignInAttempt(db, claim.attemptId, "success");
  await audit(db, { userId: user.id, action: "sign-in.success", objectType: "user", objectId: user.id, detail: { method: "password" }, ip });
  return { userId: user.id, method: "password" };
}

/** Maps the provider's identity to a user: by subject, else by e-mail, else a new account. */
export async function userFromIdClaims(db: Knex, claims: IdClaims, ip: string): Promise<SignedIn> {
  try {
    return await linkOrCreate(db, claims, ip);
  } catch (e) {
    if (e instanceof SignInError) {
      // Written after the rollback, so the refusal is on record while nothing else changed.
      const known = await findUserByEmail(db, claims.email);
      await audit(db, {
        userId: known?.id ?? null,
        action: "sign-in.failure",
        objectType: known ? "user" : null,
        objectId: known?.id ?? null,
        detail: { method: "oidc", email: claims.email, reason: e.code },
        ip,
      });
    }
    throw e;
  }
}

async function linkOrCreate(db: Knex, claims: IdClaims, ip: string): Promise<SignedIn> {
  return db.transaction(async (trx) => {
    if (!claims.sub) throw new SignInError("The sign-in provider did not name the person; try again.", "no-subject");
    let user = await findUserByOidcSubject(trx, claims.sub);
    if (!user) {
      const byEmail = await findUserByEmail(trx, claims.email);
      if (byEmail) {
        if (!claims.emailVerified) {
          throw new SignInError("The sign-in provider has not confirmed this e-mail address, so it cannot be linked to the existing account.", "unconfirmed-email");
        }
        // An account is bound to one single sign-on identity (its subject was not found above):
        // another subject with the same address is not that person, and is never bound in its place.
        if (!(await linkOidcSubject(trx, byEmail.id, claims.sub))) {
          throw new SignInError("This account is linked to a different single sign-on identity; sign in with that one, or with e-mail and password.", "other-subject");
        }
        await markEmailVerified(trx, byEmail.id);
        user = byEmail;
      }
    }
    let created = false;
    if (!user) {
      const id = await createUser(trx, {
        email: claims.email,
        name: claims.name,
        role: defaultRole(),
        verified: claims.emailVerified,
        oidcSubject: claims.sub,
      });
      await audit(trx, { userId: id, action: "user.create", objectType: "user", objectId: id, detail: { method: "oidc", role: defaultRole() }, ip });
      user = (await findUserByEmail(trx, claims.email))!;
      created = true;
    }
    if (user.disabled) throw new SignInError("This account is disabled; ask an administrator.", "disabled");
    await recordSignInAttempt(trx, { email: user.email, ip, success: true, method: "oidc" });
    await audit(trx, { userId: user.id, action: "sign-in.success", objectType: "user", objectId: user.id, detail: { method: "oidc", created }, ip });
    return { userId: user.id, method: "oidc" } as SignedIn;
  });
}

let authenticator: Promise<Authenticator<SignedIn>> | undefined;

async function build(): Promise<Authenticator<SignedIn>> {
  const auth = new Authenticator<SignedIn>();
  auth.use(
    new FormStrategy<SignedIn>(async ({ form, request }) => signInWithPassword(getDb(), form, clientAddress(request))),
    "password",
  );
  const cfg = oidcConfig();
  if (cfg) {
    const strategy = await OidcStrategy.discover<SignedIn, OidcStrategy<SignedIn>>(
      cfg.issuer,
      {
        clientId: cfg.clientId,
        clientSecret: cfg.clientSecret || null,
        redirectURI: cfg.redirectUri,
        scopes: ["openid", "email", "profile"],
        cookie: {
          name: "__saddlebook_oidc",
          path: "/",
          httpOnly: true,
          sameSite: "Lax",
          ...(process.env.NODE_ENV === "production" && cfg.redirectUri.startsWith("https://") ? { secure: true as const } : {}),
          maxAge: 600,
        },
      },
      async ({ tokens, request }) => {
        // The state in the callback URL has been checked against the browser's state cookie.
        const state = new URL(request.url).searchParams.get("state") ?? "";
        const claims = await verifyIdToken(cfg, tokens.idToken(), { nonce: oidcNonce(state) });
        return userFromIdClaims(getDb(), claims, clientAddress(request));
      },
    );
    auth.use(strategy, "oidc");
  }
  return auth;
}

/** The authenticator; OIDC discovery runs on first use and is retried after a failure. */
export function getAuthenticator(): Promise<Authenticator<SignedIn>> {
  authenticator ??= build().catch((e) => {
    authenticator = undefined;
    throw new SignInError(
      `The single sign-on provider at ${oidcConfig()?.issuer ?? "(not configured)"} is not answering; try again, or sign in with e-mail and password.`,
      "unavailable",
    );
  });
  return authenticator;
}
