/**
 * Sessions ended by signing out (db/migrations/0102_ended_sessions.ts): a session is the pair
 * (user id, moment of sign-in in ms) its signed cookie carries. Signing out records the pair;
 * the per-request user lookup refuses a recorded pair in the same query that loads the user.
 */
import type { Knex } from "knex";
import { USER_WITH_GROUPS_COLUMNS, userWithGroupsFromRows, type UserWithGroups } from "./users.server";

/** The user of a session that has not been ended, with groups, in one round trip; null when ended, absent or disabled. */
export async function loadLiveSessionUser(db: Knex, userId: number, signedInAt: number): Promise<UserWithGroups | null> {
  const rows = await db("users as u")
    .leftJoin("memberships as m", "m.user_id", "u.id")
    .where("u.id", userId)
    .whereNotExists(db("ended_sessions as e").whereRaw("e.user_id = u.id").where("e.signed_in_at", signedInAt).select(db.raw("1")))
    .select(USER_WITH_GROUPS_COLUMNS);
  return userWithGroupsFromRows(rows);
}

/** Ends the session (user, sign-in moment); forgets this user's ended sessions signed in before `forgetBefore` (ms). */
export async function endSessionRecord(db: Knex, userId: number, signedInAt: number, forgetBefore: number): Promise<void> {
  await db("ended_sessions").insert({ user_id: userId, signed_in_at: signedInAt }).onConflict(["user_id", "signed_in_at"]).ignore();
  await db("ended_sessions").where({ user_id: userId }).where("signed_in_at", "<", forgetBefore).del();
}
