/**
 * A fresh database with the demo scenario for tests that call page and API modules as the demo
 * author: the route modules reach it through getDb() (DATABASE_URL), the author is returned as a
 * session user (for the page-user stand-in) with one mechanism they own.
 */
import type { SessionUser } from "../../app/auth/current-user.server";
import { freshDatabase, type TestDatabase } from "./db";
import { seedDemo } from "../../db/seeds/index";

export async function demoAuthorDatabase(): Promise<{ t: TestDatabase; author: SessionUser; mechId: number }> {
  const t = await freshDatabase();
  process.env.DATABASE_URL = t.url;
  await seedDemo(t.db);
  const u = await t.db("users").where({ email: "author@saddlebook.test" }).first();
  const author: SessionUser = { id: u.id, email: u.email, name: u.name, role: u.role, groupIds: await t.db("memberships").where({ user_id: u.id }).pluck("group_id"), adminGroupIds: [] };
  const mechId = (await t.db("mechanisms").where({ owner_id: u.id }).first("id")).id as number;
  return { t, author, mechId };
}

/** Closes the app's connection and drops the database. */
export async function dropDemoDatabase(t: TestDatabase | undefined): Promise<void> {
  const { getDb } = await import("../../db/client.server");
  await getDb().destroy();
  await t?.drop();
}
