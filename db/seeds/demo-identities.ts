/**
 * Demo identities of the invented, illustrative scenario: one user per role plus a
 * second author (so forks by different people can be shown), and one research group.
 * All names are invented; the addresses use the reserved .test domain.
 */
import type { Knex } from "knex";
import bcrypt from "bcryptjs";

/** The password of every demo identity for e-mail sign-in (listed in the README). */
export const DEMO_PASSWORD = "saddlebook-demo";

export const DEMO_USERS = [
  { email: "viewer@saddlebook.test", name: "Vela Marsh", role: "viewer" },
  { email: "author@saddlebook.test", name: "Anouk Brandt", role: "author" },
  { email: "author2@saddlebook.test", name: "Teodor Quill", role: "author" },
  { email: "curator@saddlebook.test", name: "Corin Aldane", role: "curator" },
  { email: "admin@saddlebook.test", name: "Ada Renwick", role: "admin" },
] as const;

export const DEMO_GROUP = {
  slug: "demo-kinetics",
  name: "Demo kinetics group (illustrative)",
  description: "An invented research group for the illustrative demo scenario.",
};

export async function seedDemoIdentities(db: Knex): Promise<void> {
  const hash = await bcrypt.hash(DEMO_PASSWORD, 10);
  const now = new Date();
  await db("users").insert(
    DEMO_USERS.map((u) => ({ ...u, password_hash: hash, email_verified_at: now })),
  );
  const [groupId] = await db("groups").insert(DEMO_GROUP);
  const users = await db("users").select("id", "email");
  await db("memberships").insert(
    users.map((u: { id: number; email: string }) => ({
      user_id: u.id,
      group_id: groupId,
      group_role: u.email === "admin@saddlebook.test" || u.email === "curator@saddlebook.test" ? "admin" : "member",
    })),
  );
}
